"""The compiled method-of-characteristics kernel (numba). Import only from the solver, never at startup.

Per pipe, with ``B = a/(g A)`` and ``R = f dx/(2 g D A^2)`` (Wylie & Streeter, *Fluid Transients in
Systems*, 1993, eqs. 3-18 to 3-21; Chaudhry, *Applied Hydraulic Transients*, 2014, sec. 3.3):

    C+ :  H_P = C_P - B Q_P,   C_P = H_A + B Q_A - R Q_A |Q_A|     (from the section upstream)
    C- :  H_P = C_M + B Q_P,   C_M = H_B - B Q_B + R Q_B |Q_B|     (from the section downstream)

Interior section: ``H_P = (C_P + C_M)/2``, ``Q_P = (C_P - C_M)/(2B)``. Friction is quasi-steady and
explicit (first order), adequate at Courant number 1 for the ``f L V/(2 D a)`` of building piping.

Nodes (Wylie & Streeter 1993, ch. 3; Chaudhry 2014, ch. 3): every pipe end ``e`` at a node gives an
inflow ``(C_e - H)/B_e`` (``C_e`` is ``C_P`` for a pipe ending at the node, ``C_M`` for one starting
there), so the pipes together give ``(C_s - H)/B_s`` with ``1/B_s = sum 1/B_e`` and
``C_s = B_s sum C_e/B_e``. Then

* reservoir: ``H`` fixed;
* junction or dead end: ``H = C_s``;
* valve(s) to atmosphere: ``H = C_s - B_s sum Q_v(H)``, ``Q_v = sqrt(Cv (H - z))``,
  ``Cv = (tau Q0)^2 / dH0``; closed form for one valve, safeguarded Newton for several;
* gas cushion: unknown arrestor inflow ``Q_a``; gas volume ``V = V_old - dt/2 (Q_a,old + Q_a)``
  (trapezoid), head ``C0 V^-n - H_b + z + k Q_a|Q_a|`` must equal the node head; Newton on ``Q_a``.

Vapour cavities: the discrete vapour-cavity model (DVCM; Wylie & Streeter 1993, sec. 8.4; Chaudhry 2014,
sec. 11.4) at interior sections and at nodes without an arrestor. When the head would fall below the
vapour head the head is held at it, the two sides carry different flows and the cavity volume grows by
``dt [psi (Q_out - Q_in) + (1 - psi)(Q_out - Q_in)_old]``; when the volume returns to zero the cavity
collapses. In the step where it closes, the head is set so that the step's net inflow fills exactly the
remaining volume (the DVCM continuity equation with the new volume set to zero), so no liquid is made or
lost at a collapse; from the next step the section is liquid again. ``psi = 1`` (the caller's choice; the value used
in practice, from memory).

State arrays are flat over all sections (pipes end to end); old and new arrays swap every step.
``flow_down`` is meaningful only at a section holding a cavity; elsewhere ``flow_up`` is the flow.
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
"""Cavity-volume marker of a section whose cavity closed this step: liquid, but its two flows differ."""


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
def _node_pass(
    step, t, dt, psi, cav_on, H, Qu, Qd, Vc, Hn, Qun,
    gkind, gfixed, ghv, eptr, esec, enb, esign, eb, er, cbuf,
    vptr, vq0, vdh0, vz, vfam, vexp, vtc, vt0, vq, vvol, cvb,
    garr, ac0, an, ak, az, avol, aq, hb,
    gvol, gnet, gcav, node_head, acc, stats,
):  # pragma: no cover - compiled
    for v in range(len(vq0)):
        if vq0[v] > 0.0:
            tau = area_ratio(vfam[v], vexp[v], vtc[v], vt0[v], t)
            cvb[v] = (tau * vq0[v]) ** 2 / vdh0[v]
        else:
            cvb[v] = 0.0
    supply = 0.0
    for gi in range(len(gkind)):
        e0 = eptr[gi]
        e1 = eptr[gi + 1]
        if e1 == e0:
            continue
        scb = 0.0
        sib = 0.0
        for e in range(e0, e1):
            nb = enb[e]
            b = eb[e]
            r = er[e]
            if esign[e] > 0:
                q = Qd[nb] if Vc[nb] != 0.0 else Qu[nb]
                c = H[nb] + q * (b - r * abs(q))
            else:
                q = Qu[nb]
                c = H[nb] - q * (b - r * abs(q))
            cbuf[e] = c
            scb += c / b
            sib += 1.0 / b
        bs = 1.0 / sib
        cs = scb * bs
        kind = gkind[gi]
        v0 = vptr[gi]
        v1 = vptr[gi + 1]
        ja = garr[gi]
        if kind == 1:
            head = gfixed[gi]
        elif kind == 0:
            head = cs
        elif ja >= 0:
            head, qa, vol, ok = _arrestor(
                cs, bs, v0, v1, cvb, vz, dt, ac0[ja], an[ja], ak[ja], az[ja], hb, avol[ja], aq[ja]
            )
            if not ok:
                stats[ST_STATUS] = STATUS_ARRESTOR_NEWTON
                stats[ST_WHERE] = gi
                return
            aq[ja] = qa
            avol[ja] = vol
        else:
            head, _ = _valve_head(cs, bs, v0, v1, cvb, vz)
        if cav_on and kind != 1 and ja < 0:
            vold = gvol[gi]
            hv = ghv[gi]
            if vold > 0.0 or head < hv:
                qout = 0.0
                for v in range(v0, v1):
                    dh = hv - vz[v]
                    if cvb[v] > 0.0 and dh > 0.0:
                        qout += math.sqrt(cvb[v] * dh)
                net = qout - (cs - hv) * sib
                old_rate = gnet[gi] if vold > 0.0 else 0.0
                vol = vold + dt * (psi * net + (1.0 - psi) * old_rate)
                if vol > 0.0:
                    head = hv
                    gvol[gi] = vol
                    gnet[gi] = net
                    gcav[gi] = True
                    if vol > acc[ACC_MAX_CAVITY]:
                        acc[ACC_MAX_CAVITY] = vol
                else:
                    if vold > 0.0:  # collapse: the step's net inflow closes the cavity exactly
                        rate = -(vold + dt * (1.0 - psi) * old_rate) / (psi * dt)
                        head, _ = _valve_head(cs + bs * rate, bs, v0, v1, cvb, vz)
                        stats[ST_COLLAPSES] += 1
                        if stats[ST_FIRST_COLLAPSE] < 0:
                            stats[ST_FIRST_COLLAPSE] = step
                    gvol[gi] = 0.0
        if not (abs(head) <= HEAD_LIMIT_M):
            stats[ST_STATUS] = STATUS_NODE_NONFINITE
            stats[ST_WHERE] = gi
            return
        qv_total = 0.0
        for v in range(v0, v1):
            dh = head - vz[v]
            qn = math.sqrt(cvb[v] * dh) if (cvb[v] > 0.0 and dh > 0.0) else 0.0
            vvol[v] += 0.5 * dt * (vq[v] + qn)
            vq[v] = qn
            qv_total += qn
        if kind == 1:
            supply += qv_total + (head - cs) * sib
        for e in range(e0, e1):
            s = esec[e]
            Hn[s] = head
            Qun[s] = esign[e] * (cbuf[e] - head) / eb[e]
        node_head[gi] = head
    acc[ACC_SUPPLY] = supply


@njit(cache=True)
def _interior_pass(
    step, dt, psi, cav_on, H, Qu, Qd, Hn, Qun, Qdn, Vc,
    off, nre, bco, rco, hv0, dhv, hvmax, cavcount, cav_up, cav_dn, acc, stats,
):  # pragma: no cover - compiled
    for p in range(len(off)):
        n = nre[p]
        if n < 2:
            continue
        o = off[p]
        b = bco[p]
        r = rco[p]
        inv2b = 0.5 / b
        if cavcount[p] == 0:
            lo = hvmax[p]
            nbad = 0
            for k in range(o + 1, o + n):
                qa = Qu[k - 1]
                qb = Qu[k + 1]
                cp = H[k - 1] + qa * (b - r * abs(qa))
                cm = H[k + 1] - qb * (b - r * abs(qb))
                h = 0.5 * (cp + cm)
                Hn[k] = h
                Qun[k] = (cp - cm) * inv2b
                if not (h >= lo and h <= HEAD_LIMIT_M):
                    nbad += 1
            if nbad == 0:
                continue
        count = 0
        prev_v = 0.0
        for k in range(o + 1, o + n):
            v_old = Vc[k]
            qa = Qd[k - 1] if prev_v != 0.0 else Qu[k - 1]
            qb = Qu[k + 1]
            cp = H[k - 1] + qa * (b - r * abs(qa))
            cm = H[k + 1] - qb * (b - r * abs(qb))
            h = 0.5 * (cp + cm)
            if not (abs(h) <= HEAD_LIMIT_M):
                stats[ST_STATUS] = STATUS_PIPE_NONFINITE
                stats[ST_WHERE] = p
                return
            prev_v = v_old
            if v_old < 0.0:
                v_old = 0.0
            hv = hv0[p] + dhv[p] * (k - o)
            if cav_on and (v_old > 0.0 or h < hv - 1e-6):
                qu = (cp - hv) / b
                qd = (hv - cm) / b
                old_rate = (Qd[k] - Qu[k]) if v_old > 0.0 else 0.0
                vol = v_old + dt * (psi * (qd - qu) + (1.0 - psi) * old_rate)
                if vol > 0.0:
                    Hn[k] = hv
                    Qun[k] = qu
                    Qdn[k] = qd
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
                    h = 0.5 * (cp + cm + b * rate)
                    Hn[k] = h
                    Qun[k] = (cp - h) / b
                    Qdn[k] = (h - cm) / b
                    Vc[k] = JUST_CLOSED
                    count += 1
                    stats[ST_COLLAPSES] += 1
                    if stats[ST_FIRST_COLLAPSE] < 0:
                        stats[ST_FIRST_COLLAPSE] = step
                    continue
            Vc[k] = 0.0
            Hn[k] = h
            Qun[k] = (cp - cm) * inv2b
        cavcount[p] = count


@njit(cache=True)
def run(
    n_steps, dt, psi, cav_on,
    head0, qu0, qd0, vc0,
    off, nre, bco, rco, hv0, dhv, hvmax,
    gkind, gfixed, ghv, ghead0, eptr, esec, enb, esign, eb, er,
    vptr, vq0, vdh0, vz, vfam, vexp, vtc, vt0,
    garr, ac0, an, ak, az, avol0, hb,
    rec_groups, rec_every,
    rec_out, gmax_first, gmax_after, gmin, gcav, cav_up, cav_dn, vvol, acc, stats,
):  # pragma: no cover - compiled
    """Advance ``n_steps`` steps of ``dt``; fill the output arrays; return the final state."""
    H = head0.copy()
    Qu = qu0.copy()
    Qd = qd0.copy()
    Vc = vc0.copy()
    Hn = head0.copy()
    Qun = qu0.copy()
    Qdn = qd0.copy()
    n_groups = len(gkind)
    node_head = ghead0.copy()
    cbuf = np.zeros(len(esec))
    cvb = np.zeros(len(vq0))
    vq = vq0.copy()
    avol = avol0.copy()
    aq = np.zeros(len(avol0))
    gvol = np.zeros(n_groups)
    gnet = np.zeros(n_groups)
    cavcount = np.zeros(len(off), dtype=np.int64)
    stats[ST_FIRST_COLLAPSE] = -1
    for gi in range(n_groups):
        gmax_first[gi] = node_head[gi]
        gmin[gi] = node_head[gi]
        gmax_after[gi] = -np.inf
    for r in range(len(rec_groups)):
        rec_out[0, r] = node_head[rec_groups[r]]
    supply_old = acc[ACC_SUPPLY]
    for step in range(1, n_steps + 1):
        t = step * dt
        _node_pass(
            step, t, dt, psi, cav_on, H, Qu, Qd, Vc, Hn, Qun,
            gkind, gfixed, ghv, eptr, esec, enb, esign, eb, er, cbuf,
            vptr, vq0, vdh0, vz, vfam, vexp, vtc, vt0, vq, vvol, cvb,
            garr, ac0, an, ak, az, avol, aq, hb,
            gvol, gnet, gcav, node_head, acc, stats,
        )
        if stats[ST_STATUS] != STATUS_OK:
            stats[ST_STEP] = step
            break
        _interior_pass(
            step, dt, psi, cav_on, H, Qu, Qd, Hn, Qun, Qdn, Vc,
            off, nre, bco, rco, hv0, dhv, hvmax, cavcount, cav_up, cav_dn, acc, stats,
        )
        if stats[ST_STATUS] != STATUS_OK:
            stats[ST_STEP] = step
            break
        acc[ACC_SUPPLY_VOLUME] += 0.5 * dt * (supply_old + acc[ACC_SUPPLY])
        supply_old = acc[ACC_SUPPLY]
        if stats[ST_FIRST_COLLAPSE] >= 0:
            for gi in range(n_groups):
                h = node_head[gi]
                if h > gmax_after[gi]:
                    gmax_after[gi] = h
                if h < gmin[gi]:
                    gmin[gi] = h
        else:
            for gi in range(n_groups):
                h = node_head[gi]
                if h > gmax_first[gi]:
                    gmax_first[gi] = h
                if h < gmin[gi]:
                    gmin[gi] = h
        if step % rec_every == 0:
            row = step // rec_every
            for r in range(len(rec_groups)):
                rec_out[row, r] = node_head[rec_groups[r]]
        H, Hn = Hn, H
        Qu, Qun = Qun, Qu
        Qd, Qdn = Qdn, Qd
    total_cavity = 0.0
    for k in range(len(Vc)):
        if Vc[k] > 0.0:
            total_cavity += Vc[k]
    for gi in range(n_groups):
        total_cavity += gvol[gi]
    return H, Qu, avol, total_cavity
