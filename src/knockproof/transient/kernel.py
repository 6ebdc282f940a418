"""The compiled method-of-characteristics kernel (numba). Imported only by the solver when it runs.

Per pipe, with ``B = a/(g A)`` and ``R = f dx/(2 g D A^2)`` (Wylie & Streeter, *Fluid Transients in
Systems*, 1993, eqs. 3-18 to 3-21; Chaudhry, *Applied Hydraulic Transients*, 2014, sec. 3.3):

    C+ :  H_P = C_P - B Q_P,   C_P = H_A + B Q_A - R Q_A |Q_A|     (from the section upstream) C- :
    H_P = C_M + B Q_P,   C_M = H_B - B Q_B + R Q_B |Q_B|     (from the section downstream)

Interior section: ``H_P = (C_P + C_M)/2``, ``Q_P = (C_P - C_M)/(2B)``. Friction is quasi-steady and
explicit (first order), adequate at Courant number 1 for the ``f L V/(2 D a)`` of building piping.

Nodes (Wylie & Streeter 1993, ch. 3; Chaudhry 2014, ch. 3): every pipe end ``e`` at a node gives an
inflow ``(C_e - H)/B_e`` (``C_e`` is ``C_P`` for a pipe ending at the node, ``C_M`` for one starting
there), so the pipes together give ``(C_s - H)/B_s`` with ``1/B_s = sum 1/B_e`` and ``C_s = B_s sum
C_e/B_e``. Then

* reservoir: ``H`` fixed;
* junction or dead end: ``H = C_s``;
* valve(s) to atmosphere: ``H = C_s - B_s sum Q_v(H)``, ``Q_v = sqrt(Cv (H - z))``, ``Cv = (tau
  Q0)^2 / dH0``; closed form for one valve, safeguarded Newton for several;
* gas cushion: unknown arrestor inflow ``Q_a``; gas volume ``V = V_old - dt/2 (Q_a,old + Q_a)``
  (trapezoid), head ``C0 V^-n - H_b + z + k Q_a|Q_a|`` must equal the node head; Newton on ``Q_a``.

Vapour cavities: the discrete vapour-cavity model (DVCM; Wylie & Streeter 1993, sec. 8.4; Chaudhry
2014, sec. 11.4) at interior sections and at nodes without an arrestor. When the head would fall
below the vapour head the head is held at it, the two sides carry different flows and the cavity
volume grows by ``dt [psi (Q_out - Q_in) + (1 - psi)(Q_out - Q_in)_old]``; when the volume returns
to zero the cavity collapses. In the step where it closes, the head is set so that the step's net
inflow fills exactly the remaining volume (the DVCM continuity equation with the new volume set to
zero), so no liquid is made or lost at a collapse; from the next step the section is liquid again.
``psi = 1`` (the value used in practice, from memory).

State arrays are flat over all sections (pipes end to end); old and new arrays swap every step.
Flows are stored scaled to head units, ``q = B Q`` [m], with the pipe's own ``B``: then the
characteristics read ``C_P = H_A + q_A - R' q_A|q_A|`` and ``C_M = H_B - q_B + R' q_B|q_B|`` with
``R' = R/B^2``, and an interior section is ``H = (C_P + C_M)/2``, ``q = (C_P - C_M)/2``: one
coefficient per section and no division, which halves the memory traffic of the update. Each section
keeps its upstream-side flow ``qu``; the downstream-side flow ``qd`` is kept only where a cavity is
open or closed this step (cavity volume non-zero; ``JUST_CLOSED`` marks the latter). A step is: (1)
a liquid update of every section in one flat loop, counting sections below their vapour head; (2)
the nodes, which overwrite the pipe-end sections; (3) the DVCM update, redone from the old state, of
the interiors of pipes that hold cavities or were flagged in (1).
"""

from __future__ import annotations

import math

import numpy as np
from numba import njit

HEAD_LIMIT_M = 1.0e6
"""A head beyond this [m] (about 10 GPa) means the state has blown up."""

# stats (int64) slots
ST_COLLAPSES = 0
ST_FIRST_COLLAPSE = 1
ST_STATUS = 2
ST_WHERE = 3
ST_STEP = 4
# status codes
STATUS_OK = 0
STATUS_PIPE_NONFINITE = 1
STATUS_NODE_NONFINITE = 2
STATUS_ARRESTOR_NEWTON = 3
# acc (float64) slots
ACC_SUPPLY = 0
ACC_MAX_CAVITY = 1
ACC_SUPPLY_VOLUME = 2

JUST_CLOSED = -1.0
"""Cavity-volume marker of a section whose cavity closed this step (liquid, two flows differ)."""


@njit(cache=True)
def area_ratio(family, exponent, closure, start, t):  # pragma: no cover - compiled
    """Effective-area ratio of a valve; the same laws as closure.effective_area_ratio."""
    if family == 0:
        return 0.0 if t >= start else 1.0
    s = (t - start) / closure
    if s <= 0.0:
        return 1.0
    if s >= 1.0:
        return 0.0
    if family == 1:
        return (1.0 - s) ** exponent
    return 1.0 - s**exponent


@njit(cache=True)
def _valve_head(cs, bs, v0, v1, cv, vz):  # pragma: no cover - compiled
    """Head at a node with valves v0..v1 given C_s, B_s; returns (H, dQ_valves/dH)."""
    if v1 == v0:
        return cs, 0.0
    if v1 - v0 == 1:
        c = cv[v0]
        h = cs - vz[v0]
        if c <= 0.0 or h <= 0.0:
            return cs, 0.0
        bc = bs * c
        q = 2.0 * c * h / (bc + math.sqrt(bc * bc + 4.0 * c * h))
        return cs - bs * q, 0.5 * c / q
    lo = cs
    for v in range(v0, v1):
        lo = min(lo, vz[v])
    hi = cs
    if lo >= hi:
        return cs, 0.0
    head = hi
    for _ in range(200):
        f = head - cs
        df = 1.0
        for v in range(v0, v1):
            dh = head - vz[v]
            if cv[v] > 0.0 and dh > 0.0:
                q = math.sqrt(cv[v] * dh)
                f += bs * q
                df += bs * 0.5 * cv[v] / q
        if f > 0.0:
            hi = head
        else:
            lo = head
        new = head - f / df
        if not (lo < new < hi):
            new = 0.5 * (lo + hi)
        if abs(new - head) <= 1e-13 * (1.0 + abs(head)):
            head = new
            break
        head = new
    dq = 0.0
    for v in range(v0, v1):
        dh = head - vz[v]
        if cv[v] > 0.0 and dh > 0.0:
            dq += 0.5 * cv[v] / math.sqrt(cv[v] * dh)
    return head, dq


@njit(cache=True)
def _arrestor(cs, bs, v0, v1, cv, vz, dt, c0, n, k, z, hb, vol_old, q_old):  # pragma: no cover
    """Solve a node with a gas cushion: returns (H, Q_a, V_gas, converged)."""
    qa = q_old
    for _ in range(100):
        vol = vol_old - 0.5 * dt * (q_old + qa)
        head, dqv = _valve_head(cs - bs * qa, bs, v0, v1, cv, vz)
        dhead = -bs / (1.0 + bs * dqv)
        gas = c0 * vol ** (-n)
        phi = gas - hb + z + k * qa * abs(qa) - head
        dphi = n * gas / vol * 0.5 * dt + 2.0 * k * abs(qa) - dhead
        step = -phi / dphi
        limit = 1.8 * vol / dt  # keep the new volume above 10 % of this one
        if step > limit:
            step = limit
        qa += step
        if abs(step) <= 1e-15 + 1e-11 * abs(qa):
            vol = vol_old - 0.5 * dt * (q_old + qa)
            head, dqv = _valve_head(cs - bs * qa, bs, v0, v1, cv, vz)
            return head, qa, vol, True
    return cs, qa, vol_old, False


@njit(cache=True)
def _special_node(
    gi,
    kind,
    cs,
    bs,
    step,
    dt,
    psi,
    cav_on,
    gfixed,
    ghv,
    vptr,
    vz,
    cvb,
    garr,
    ac0,
    an,
    ak,
    az,
    avol,
    aq,
    hb,
    gvol,
    gnet,
    gcav,
    acc,
    stats,
):  # pragma: no cover - compiled
    """Head at a group that is not a plain liquid junction (reservoir, valves, arrestor, cavity)."""
    v0 = vptr[gi]
    v1 = vptr[gi + 1]
    ja = garr[gi]
    if kind == 1:
        return gfixed[gi]
    if ja >= 0:
        head, qa, vol, ok = _arrestor(
            cs, bs, v0, v1, cvb, vz, dt, ac0[ja], an[ja], ak[ja], az[ja], hb, avol[ja], aq[ja]
        )
        if not ok:
            stats[ST_STATUS] = STATUS_ARRESTOR_NEWTON
            stats[ST_WHERE] = gi
            return head
        aq[ja] = qa
        avol[ja] = vol
        return head
    head, _ = _valve_head(cs, bs, v0, v1, cvb, vz)
    if not cav_on:
        return head
    vold = gvol[gi]
    hv = ghv[gi]
    if vold > 0.0 or head < hv:
        qout = 0.0
        for v in range(v0, v1):
            dh = hv - vz[v]
            if cvb[v] > 0.0 and dh > 0.0:
                qout += math.sqrt(cvb[v] * dh)
        net = qout - (cs - hv) / bs
        old_rate = gnet[gi] if vold > 0.0 else 0.0
        vol = vold + dt * (psi * net + (1.0 - psi) * old_rate)
        if vol > 0.0:
            gvol[gi] = vol
            gnet[gi] = net
            gcav[gi] = True
            if vol > acc[ACC_MAX_CAVITY]:
                acc[ACC_MAX_CAVITY] = vol
            return hv
        if vold > 0.0:  # collapse: the step's net inflow closes the cavity exactly
            rate = -(vold + dt * (1.0 - psi) * old_rate) / (psi * dt)
            head, _ = _valve_head(cs + bs * rate, bs, v0, v1, cvb, vz)
            stats[ST_COLLAPSES] += 1
            if stats[ST_FIRST_COLLAPSE] < 0:
                stats[ST_FIRST_COLLAPSE] = step
        gvol[gi] = 0.0
    return head


@njit(cache=True)
def _flat_pass(S, T, sr, thr, block_pipe, off, block_bad):  # pragma: no cover - compiled
    """Liquid update of every section from its neighbours, block by block (see the module notes).

    Pipe ends get a value too, which the nodes overwrite. ``block_bad[b]`` counts the sections of
    block ``b`` below their threshold ``thr`` (vapour head of an interior section of a liquid pipe,
    ``-HEAD_LIMIT_M`` elsewhere) or beyond :data:`HEAD_LIMIT_M` or not finite; returns the total.
    """
    n = len(sr)
    total = 0
    for b in range(len(block_pipe) - 1):
        k0 = max(off[block_pipe[b]], 1)
        k1 = min(off[block_pipe[b + 1]], n - 1)
        nbad = 0
        for k in range(k0, k1):
            cp = S[k - 1]
            cm = S[n + k + 1]
            h = 0.5 * (cp + cm)
            q = 0.5 * (cp - cm)
            f = sr[k] * q * abs(q)
            T[k] = h + q - f
            T[n + k] = h - q + f
            nbad += not (h >= thr[k] and h <= HEAD_LIMIT_M)
        block_bad[b] = nbad
        total += nbad
    return total


@njit(cache=True)
def _plain_nodes(
    S, T, g0, g1, degree, eptr, ein, eout, esgn, er, einv, gbs, gthr, gmax, gmin, gh, deferred, nd
):  # pragma: no cover - compiled
    """Plain liquid junctions ``g0 .. g1-1``, all of ``degree`` pipe ends; returns the new count
    of deferred groups (a head below ``gthr`` or beyond the limit goes to the general solver)."""
    e0 = eptr[g0]
    if degree == 1:  # dead ends
        for gi in range(g0, g1):
            e = e0 + (gi - g0)
            ce = S[ein[e]]
            head = (0.0 + ce * einv[e]) * gbs[gi]
            if not (head >= gthr[gi] and head <= HEAD_LIMIT_M):
                deferred[nd] = gi
                nd += 1
                continue
            s = esgn[e]
            q = s * (ce - head)
            T[eout[e]] = head - s * q + s * (er[e] * q * abs(q))
            gh[gi] = head
            if head > gmax[gi]:
                gmax[gi] = head
            if head < gmin[gi]:
                gmin[gi] = head
    elif degree == 2:  # series junctions
        for gi in range(g0, g1):
            e = e0 + 2 * (gi - g0)
            ca = S[ein[e]]
            cb = S[ein[e + 1]]
            head = ((0.0 + ca * einv[e]) + cb * einv[e + 1]) * gbs[gi]
            if not (head >= gthr[gi] and head <= HEAD_LIMIT_M):
                deferred[nd] = gi
                nd += 1
                continue
            s = esgn[e]
            q = s * (ca - head)
            T[eout[e]] = head - s * q + s * (er[e] * q * abs(q))
            s = esgn[e + 1]
            q = s * (cb - head)
            T[eout[e + 1]] = head - s * q + s * (er[e + 1] * q * abs(q))
            gh[gi] = head
            if head > gmax[gi]:
                gmax[gi] = head
            if head < gmin[gi]:
                gmin[gi] = head
    else:
        for gi in range(g0, g1):
            e0 = eptr[gi]
            e1 = e0 + degree
            scb = 0.0
            for e in range(e0, e1):
                scb += S[ein[e]] * einv[e]
            head = scb * gbs[gi]
            if not (head >= gthr[gi] and head <= HEAD_LIMIT_M):
                deferred[nd] = gi
                nd += 1
                continue
            for e in range(e0, e1):
                s = esgn[e]
                q = s * (S[ein[e]] - head)
                T[eout[e]] = head - s * q + s * (er[e] * q * abs(q))
            gh[gi] = head
            if head > gmax[gi]:
                gmax[gi] = head
            if head < gmin[gi]:
                gmin[gi] = head
    return nd


@njit(cache=True)
def _general_nodes(
    step,
    t,
    dt,
    psi,
    cav_on,
    S,
    T,
    n_plain,
    deferred,
    n_deferred,
    gkind,
    gfixed,
    ghv,
    gthr,
    gbs,
    gh,
    eptr,
    ein,
    eout,
    esgn,
    er,
    einv,
    vptr,
    vq0,
    vdh0,
    vz,
    vfam,
    vexp,
    vtc,
    vt0,
    vq,
    vvol,
    cvb,
    garr,
    ac0,
    an,
    ak,
    az,
    avol,
    aq,
    hb,
    gvol,
    gnet,
    gcav,
    gmax,
    gmin,
    acc,
    stats,
):  # pragma: no cover - compiled
    """The deferred plain junctions, then the reservoirs, valves and arrestors (numbered after the
    plain junctions): the general node equations of :func:`_special_node`."""
    for v in range(len(vq0)):
        if vq0[v] > 0.0:
            tau = area_ratio(vfam[v], vexp[v], vtc[v], vt0[v], t)
            cvb[v] = (tau * vq0[v]) ** 2 / vdh0[v]
        else:
            cvb[v] = 0.0
    supply = 0.0
    n_groups = len(gkind)
    for m in range(n_deferred + n_groups - n_plain):
        gi = deferred[m] if m < n_deferred else n_plain + m - n_deferred
        e0 = eptr[gi]
        e1 = eptr[gi + 1]
        scb = 0.0
        for e in range(e0, e1):
            scb += S[ein[e]] * einv[e]
        bs = gbs[gi]
        cs = scb * bs
        kind = gkind[gi]
        head = _special_node(
            gi,
            kind,
            cs,
            bs,
            step,
            dt,
            psi,
            cav_on,
            gfixed,
            ghv,
            vptr,
            vz,
            cvb,
            garr,
            ac0,
            an,
            ak,
            az,
            avol,
            aq,
            hb,
            gvol,
            gnet,
            gcav,
            acc,
            stats,
        )
        if not (abs(head) <= HEAD_LIMIT_M):
            stats[ST_STATUS] = STATUS_NODE_NONFINITE
            stats[ST_WHERE] = gi
        if stats[ST_STATUS] != STATUS_OK:
            return
        if gi < n_plain:
            gthr[gi] = np.inf if gvol[gi] > 0.0 else ghv[gi]
        qv_total = 0.0
        for v in range(vptr[gi], vptr[gi + 1]):
            dh = head - vz[v]
            qn = math.sqrt(cvb[v] * dh) if (cvb[v] > 0.0 and dh > 0.0) else 0.0
            vvol[v] += 0.5 * dt * (vq[v] + qn)
            vq[v] = qn
            qv_total += qn
        if kind == 1:
            supply += qv_total + (head - cs) / bs
        for e in range(e0, e1):
            s = esgn[e]
            q = s * (S[ein[e]] - head)
            T[eout[e]] = head - s * q + s * (er[e] * q * abs(q))
        gh[gi] = head
        if head > gmax[gi]:
            gmax[gi] = head
        if head < gmin[gi]:
            gmin[gi] = head
    acc[ACC_SUPPLY] = supply


@njit(cache=True)
def _pipe_with_cavities(
    p,
    step,
    dt,
    psi,
    cav_on,
    S,
    T,
    Vc,
    Qcu,
    Qcd,
    Hf,
    off,
    nre,
    bco,
    rco,
    hv0,
    dhv,
    cav_up,
    cav_dn,
    acc,
    stats,
):  # pragma: no cover - compiled
    """DVCM update of the interior of pipe ``p``; returns its number of open (or closing) cavities.

    Flows are scaled (``q = B Q``); the cavity volume uses real flows ``(qd - qu)/B``. A section
    with a cavity keeps its two flows in ``Qcu``, ``Qcd``; its outgoing characteristics use the
    downstream-side flow for ``C+`` and the upstream-side flow for ``C-``.
    """
    ns = len(Vc)
    n = nre[p]
    o = off[p]
    inv_b = 1.0 / bco[p]
    r = rco[p]
    count = 0
    for k in range(o + 1, o + n):
        v_old = Vc[k]
        if v_old < 0.0:  # JUST_CLOSED last step: liquid now
            v_old = 0.0
        cp = S[k - 1]
        cm = S[ns + k + 1]
        h = 0.5 * (cp + cm)
        if not (abs(h) <= HEAD_LIMIT_M):
            stats[ST_STATUS] = STATUS_PIPE_NONFINITE
            stats[ST_WHERE] = p
            return count
        hv = hv0[p] + dhv[p] * (k - o)
        if cav_on and (v_old > 0.0 or h < hv - 1e-6):
            qu = cp - hv
            qd = hv - cm
            old_rate = (Qcd[k] - Qcu[k]) * inv_b if v_old > 0.0 else 0.0
            vol = v_old + dt * (psi * (qd - qu) * inv_b + (1.0 - psi) * old_rate)
            if vol > 0.0:
                Hf[k] = hv
                T[k] = hv + qd - r * qd * abs(qd)
                T[ns + k] = hv - qu + r * qu * abs(qu)
                Qcu[k] = qu
                Qcd[k] = qd
                Vc[k] = vol
                count += 1
                j = k - o
                if 2 * j <= n:
                    cav_up[p] = True
                if 2 * j >= n:
                    cav_dn[p] = True
                if vol > acc[ACC_MAX_CAVITY]:
                    acc[ACC_MAX_CAVITY] = vol
                continue
            if v_old > 0.0:  # collapse: the step's net inflow closes the cavity exactly
                rate = -(v_old + dt * (1.0 - psi) * old_rate) / (psi * dt)
                h = 0.5 * (cp + cm + bco[p] * rate)
                qu = cp - h
                qd = h - cm
                Hf[k] = h
                T[k] = h + qd - r * qd * abs(qd)
                T[ns + k] = h - qu + r * qu * abs(qu)
                Vc[k] = JUST_CLOSED
                count += 1  # its two flows still differ: keep the pipe on this path one more step
                stats[ST_COLLAPSES] += 1
                if stats[ST_FIRST_COLLAPSE] < 0:
                    stats[ST_FIRST_COLLAPSE] = step
                continue
        Vc[k] = 0.0
        Hf[k] = h
        q = 0.5 * (cp - cm)
        f = r * q * abs(q)
        T[k] = h + q - f
        T[ns + k] = h - q + f
    return count


@njit(cache=True)
def _set_threshold(p, off, nre, hv0, dhv, thr, liquid):  # pragma: no cover - compiled
    """Thresholds of pipe p's interior: vapour heads while liquid, none while it has a cavity."""
    o = off[p]
    for k in range(o + 1, o + nre[p]):
        thr[k] = hv0[p] + dhv[p] * (k - o) if liquid else -HEAD_LIMIT_M


@njit(cache=True)
def _flagged(p, S, thr, off, nre):  # pragma: no cover - compiled
    """Whether a liquid section of pipe p's interior fell below its threshold (or blew up)."""
    ns = len(thr)
    o = off[p]
    for k in range(o + 1, o + nre[p]):
        h = 0.5 * (S[k - 1] + S[ns + k + 1])
        if not (h >= thr[k] and h <= HEAD_LIMIT_M):
            return True
    return False


@njit(cache=True)
def run(
    n_steps,
    dt,
    psi,
    cav_on,
    state0,
    off,
    nre,
    bco,
    rco,
    hv0,
    dhv,
    sr,
    thr0,
    block_pipe,
    n_plain,
    class_start,
    class_degree,
    gkind,
    gfixed,
    ghv,
    gbs,
    ghead0,
    eptr,
    ein,
    eout,
    esgn,
    er,
    einv,
    esec,
    vptr,
    vq0,
    vdh0,
    vz,
    vfam,
    vexp,
    vtc,
    vt0,
    garr,
    ac0,
    an,
    ak,
    az,
    avol0,
    hb,
    rec_groups,
    rec_every,
    rec_out,
    gmax_first,
    gmax_after,
    gmin,
    gcav,
    cav_up,
    cav_dn,
    vvol,
    acc,
    stats,
):  # pragma: no cover - compiled
    """Advance ``n_steps`` steps of ``dt``; fill the output arrays; return the final state.

    ``state0`` holds the outgoing characteristics ``C+`` then ``C-`` of every section (length
    ``2 N``); ``rco`` and ``sr`` are scaled (``R/B^2``); ``bco`` is ``B`` per pipe. ``ein`` and
    ``eout`` index, per pipe end, the characteristic a node receives (in ``state0``'s layout) and
    the one it sends back. Returns (section heads, arrestor gas volumes, cavity volume left).
    """
    ns = len(sr)
    S = state0.copy()
    T = state0.copy()
    Vc = np.zeros(ns)
    Qcu = np.zeros(ns)
    Qcd = np.zeros(ns)
    Hf = np.zeros(ns)
    thr = thr0.copy()
    gthr = ghv.copy()
    n_groups = len(gkind)
    n_pipes = len(off)
    n_blocks = len(block_pipe) - 1
    block_bad = np.zeros(n_blocks, dtype=np.int64)
    deferred = np.zeros(n_groups, dtype=np.int64)
    cvb = np.zeros(len(vq0))
    vq = vq0.copy()
    avol = avol0.copy()
    aq = np.zeros(len(avol0))
    gvol = np.zeros(n_groups)
    gnet = np.zeros(n_groups)
    gh = ghead0.copy()
    cavcount = np.zeros(n_pipes, dtype=np.int64)
    todo = np.zeros(n_pipes, dtype=np.int64)  # pipes on the DVCM path this step
    active = np.zeros(n_pipes, dtype=np.int64)  # pipes holding cavities (increasing)
    n_active = 0
    n_todo = 0
    off_end = np.empty(n_pipes + 1, dtype=np.int64)
    off_end[:n_pipes] = off
    off_end[n_pipes] = ns
    stats[ST_FIRST_COLLAPSE] = -1
    for gi in range(n_groups):
        gmax_first[gi] = ghead0[gi]
        gmin[gi] = ghead0[gi]
        gmax_after[gi] = -np.inf
    for r in range(len(rec_groups)):
        rec_out[0, r] = ghead0[rec_groups[r]]
    supply_old = acc[ACC_SUPPLY]
    for step in range(1, n_steps + 1):
        t = step * dt
        gmax = gmax_after if stats[ST_FIRST_COLLAPSE] >= 0 else gmax_first
        nbad = _flat_pass(S, T, sr, thr, block_pipe, off_end, block_bad)
        nd = 0
        for c in range(len(class_degree)):
            nd = _plain_nodes(
                S,
                T,
                class_start[c],
                class_start[c + 1],
                class_degree[c],
                eptr,
                ein,
                eout,
                esgn,
                er,
                einv,
                gbs,
                gthr,
                gmax,
                gmin,
                gh,
                deferred,
                nd,
            )
        _general_nodes(
            step,
            t,
            dt,
            psi,
            cav_on,
            S,
            T,
            n_plain,
            deferred,
            nd,
            gkind,
            gfixed,
            ghv,
            gthr,
            gbs,
            gh,
            eptr,
            ein,
            eout,
            esgn,
            er,
            einv,
            vptr,
            vq0,
            vdh0,
            vz,
            vfam,
            vexp,
            vtc,
            vt0,
            vq,
            vvol,
            cvb,
            garr,
            ac0,
            an,
            ak,
            az,
            avol,
            aq,
            hb,
            gvol,
            gnet,
            gcav,
            gmax,
            gmin,
            acc,
            stats,
        )
        if stats[ST_STATUS] != STATUS_OK:
            stats[ST_STEP] = step
            break
        n_todo = 0
        if nbad > 0 or n_active > 0:
            # pipes newly below their vapour head (in the flagged blocks), merged in increasing
            # order with those holding cavities
            i = 0
            for b in range(n_blocks):
                if block_bad[b] == 0:
                    continue
                for p in range(block_pipe[b], block_pipe[b + 1]):
                    if nre[p] < 2 or cavcount[p] > 0 or not _flagged(p, S, thr, off, nre):
                        continue
                    while i < n_active and active[i] < p:
                        todo[n_todo] = active[i]
                        n_todo += 1
                        i += 1
                    todo[n_todo] = p
                    n_todo += 1
            while i < n_active:
                todo[n_todo] = active[i]
                n_todo += 1
                i += 1
            n_active = 0
            for m in range(n_todo):
                p = todo[m]
                count = _pipe_with_cavities(
                    p,
                    step,
                    dt,
                    psi,
                    cav_on,
                    S,
                    T,
                    Vc,
                    Qcu,
                    Qcd,
                    Hf,
                    off,
                    nre,
                    bco,
                    rco,
                    hv0,
                    dhv,
                    cav_up,
                    cav_dn,
                    acc,
                    stats,
                )
                if stats[ST_STATUS] != STATUS_OK:
                    break
                if (count > 0) != (cavcount[p] > 0):
                    _set_threshold(p, off, nre, hv0, dhv, thr, count == 0)
                cavcount[p] = count
                if count > 0:
                    active[n_active] = p
                    n_active += 1
        if stats[ST_STATUS] != STATUS_OK:
            stats[ST_STEP] = step
            break
        acc[ACC_SUPPLY_VOLUME] += 0.5 * dt * (supply_old + acc[ACC_SUPPLY])
        supply_old = acc[ACC_SUPPLY]
        if step % rec_every == 0:
            row = step // rec_every
            for r in range(len(rec_groups)):
                rec_out[row, r] = gh[rec_groups[r]]
        if step == n_steps:  # heads of the final state (the DVCM path wrote its pipes' own)
            done = np.zeros(n_pipes, dtype=np.bool_)
            for m in range(n_todo):
                done[todo[m]] = True
            for p in range(n_pipes):
                if not done[p]:
                    for k in range(off[p] + 1, off[p] + nre[p]):
                        Hf[k] = 0.5 * (S[k - 1] + S[ns + k + 1])
        S, T = T, S
    for gi in range(n_groups):
        for e in range(eptr[gi], eptr[gi + 1]):
            Hf[esec[e]] = gh[gi]
    total_cavity = 0.0
    for k in range(ns):
        if Vc[k] > 0.0:
            total_cavity += Vc[k]
    for gi in range(n_groups):
        total_cavity += gvol[gi]
    return Hf, avol, total_cavity
