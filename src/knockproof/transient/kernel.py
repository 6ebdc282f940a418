"""The compiled method-of-characteristics kernel (numba). Imported only by the solver when it runs.

Per pipe, with ``B = a/(g A)`` and ``R = f dx/(2 g D A^2)`` (Wylie & Streeter, *Fluid Transients in
Systems*, 1993, eqs. 3-18 to 3-21; Chaudhry, *Applied Hydraulic Transients*, 2014, sec. 3.3):

    C+ :  H_P = C_P - B Q_P,   C_P = H_A + B Q_A - R Q_A |Q_A|     (from the section upstream)
    C- :  H_P = C_M + B Q_P,   C_M = H_B - B Q_B + R Q_B |Q_B|     (from the section downstream)

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

State: flat over all sections (pipes end to end, in the layout order of
:mod:`knockproof.transient.assembly`). Flows are scaled to head units, ``q = B Q`` [m], with the
pipe's own ``B``, so that the characteristics read ``C_P = H_A + q_A - R' q_A|q_A|`` and ``C_M = H_B -
q_B + R' q_B|q_B|`` with ``R' = R/B^2``, and an interior section is ``H = (C_P + C_M)/2``, ``q =
(C_P - C_M)/2``: one coefficient per section and no division. Each section keeps the two
characteristics it sends out, ``C+ = H + q - R' q|q|`` (read by the section downstream as its
``C_P``) and ``C- = H - q + R' q|q|`` (read upstream as ``C_M``); each is computed once, where the
section is updated, and the arithmetic is the same as computing it where it is read. A section with
an open cavity (or one that closed this step, ``JUST_CLOSED``) sends ``C+`` with its
downstream-side flow and ``C-`` with its upstream-side one.

Storage: one array holds the ``C+`` of every section in one half and the ``C-`` in the other, and
the two drift through their halves, ``C+`` one place down and ``C-`` one place up per step (at step
``j`` the views ``Av = S[span + 1 - j :]`` and ``Bv = S[half + j :]``). Then the ``C_P`` that
section ``k`` receives (the ``C+`` section ``k - 1`` sent) is ``Av[k]``, its ``C_M`` is ``Bv[k]``,
and it writes what it sends to the same two places: the update is in place, one state instead of
an old and a new one, and its working set (about 20 bytes a section) stays in the core's own cache
for trees of some 40,000 sections. Every ``span`` steps (:data:`REBASE_STEPS` or the number of
sections, whichever is larger) the state is moved back to its starting place.

Nodes by ghost values: a pipe-end section is updated by the same loop as an interior one, once its
node has put ``2 H - C`` into the place of the characteristic that would come from beyond the pipe
end (``C`` being the one that comes along the pipe, ``H`` the node head): the section then gets
``H`` (to rounding) and the flow of the node equations (``q = C - H`` at a pipe's last section, ``H -
C`` at its first), and friction is applied the same way as inside the pipe. A step: (1) the plain
junctions, from what arrives at their pipe ends, write their heads and ghosts, in classes written
out for speed: dead ends (``H = C``, ghost ``C``) and two-pipe junctions whose two pipe-end
sections are neighbours; junctions of one arriving and two or three leaving pipes; of one arriving
and more; the others (a tree laid out from its supply has none); (2) their heads are checked
against their vapour heads in one vectorised pass that also keeps the peaks; those that fail (and
the reservoirs, valves and arrestors) go to the general node solver, which writes its own ghosts;
(3) every section, block by block (consecutive pipes of about
:data:`~knockproof.transient.assembly.BLOCK_SECTIONS` sections), in one flat loop that the compiler
vectorises, counting the sections below a bound of the block's vapour heads or beyond
:data:`HEAD_LIMIT_M`; (4) the DVCM update of the pipes that hold cavities (what their sections
receive is kept before (3)) or that the count in (3) flags (in that first step, the characteristics
a section received are recovered from the two it sent, :func:`_arrived`); a section that stays
liquid keeps what the flat loop wrote. Sums at a node run over its pipe ends in a canonical order,
so the layout order changes no result; the grouping into blocks and classes changes no arithmetic
either. The node heads are checked every step (a head beyond :data:`HEAD_LIMIT_M` or not finite
stops the run and names the node), the interior heads for their vapour heads and against the same
limit (a head or a characteristic sent beyond it, or not finite, stops the run and names the pipe).

The helper functions are compiled without numba's reference counting (``_nrt=False``; they
allocate nothing): with it, each array passed costs atomic increments and decrements per call,
more than the work of a small node or a short pipe. The general node equations are written out in
:func:`run` for the same reason (a call with forty arrays as arguments costs more than a node).
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from numba import njit

_HELPER: dict[str, Any] = {"cache": True, "_nrt": False}
"""numba options of the helper functions: cached, and compiled without reference counting (see the
module docstring). ``_nrt`` is a private numba option: a numba upgrade may drop it (then remove it
here; the helpers still work, somewhat slower)."""

HEAD_LIMIT_M = 1.0e6
"""A head beyond this [m] (about 10 GPa) means the state has blown up."""

SENT_LIMIT_M = 4.0 * HEAD_LIMIT_M
"""A characteristic sent beyond this [m] means the same (it is a head plus a flow in head units)."""

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


@njit(**_HELPER)
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


@njit(**_HELPER)
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


@njit(**_HELPER)
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


@njit(**_HELPER)
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


NODE_CHUNK = 64
"""The plain junctions are checked against their thresholds in chunks of this many."""

REBASE_STEPS = 4096
"""The state drifts one place per step through its storage (see the module docstring); it is moved
back to its starting place every ``max(REBASE_STEPS, sections)`` steps."""


@njit(**_HELPER)
def _flat_block(Av, Bv, sr, k0, k1, thr, Hf, write_h):  # pragma: no cover - compiled
    """Update sections ``k0 .. k1-1`` in place: ``Av[k]``, ``Bv[k]`` hold the characteristics
    arriving at section ``k`` (``C_P``, ``C_M``) and receive the ones it sends (``C+``, ``C-``).
    Returns how many sections fall below ``thr`` or beyond :data:`HEAD_LIMIT_M` or are not finite
    (a pipe's end sections, which carry their node's head, are counted too: they only make the
    caller look at the block's pipes more closely)."""
    m = k1 - k0
    if m <= 0:
        return 0
    # views indexed from 0: no negative index, and the compiler vectorises the loop
    a = Av[k0:k1]
    b = Bv[k0:k1]
    r = sr[k0:k1]
    nbad = 0
    # the outgoing characteristics are C_P - R' q|q| and C_M + R' q|q| (H + q = C_P, H - q = C_M);
    # the head is checked as C_P + C_M = 2 H against twice the bounds (exact scaling)
    lo = 2.0 * thr
    hi = 2.0 * HEAD_LIMIT_M
    if write_h:
        h_out = Hf[k0:k1]
        for i in range(m):
            cp = a[i]
            cm = b[i]
            q = 0.5 * (cp - cm)
            f = np.float64(r[i]) * q * abs(q)
            a[i] = cp - f
            b[i] = cm + f
            h_out[i] = 0.5 * (cp + cm)
            s = cp + cm
            nbad += not (s >= lo and s <= hi)
    else:
        for i in range(m):
            cp = a[i]
            cm = b[i]
            q = 0.5 * (cp - cm)
            f = np.float64(r[i]) * q * abs(q)
            a[i] = cp - f
            b[i] = cm + f
            s = cp + cm
            nbad += not (s >= lo and s <= hi)
    return nbad


@njit(**_HELPER)
def _end_nodes(Av, Bv, n_dead_last, n_dead, n_pair, esec, einv, gbs, gh):  # pragma: no cover
    """Dead ends at the last section of their pipe (groups ``0 .. n_dead_last-1``), at the first
    (``.. n_dead-1``), and two-pipe junctions where a pipe's last section is followed by the next
    pipe's first (``.. n_pair-1``): heads into ``gh``, ghosts ``2 H - C`` into the pipe-end sections
    (see the module docstring). The dead ends have one pipe end each (end number = group number);
    the two-pipe junctions follow with two each, the arriving pipe's first. Unsigned section
    numbers: the compiler adds no negative-index checks."""
    one = np.uint64(1)
    # a dead end: no flow, so H = C_P (or C_M) and its ghost 2 H - C_P is C_P itself
    for i in range(n_dead_last):
        k = esec[i]
        ce = Av[k]
        Bv[k] = ce
        gh[i] = ce
    for i in range(n_dead_last, n_dead):
        k = esec[i]
        ce = Bv[k]
        Av[k] = ce
        gh[i] = ce
    for i in range(n_dead, n_pair):
        e = 2 * i - n_dead
        k = esec[e]
        ca = Av[k]
        cb = Bv[k + one]
        head = ((0.0 + ca * einv[e]) + cb * einv[e + 1]) * gbs[i]
        Bv[k] = 2.0 * head - ca
        Av[k + one] = 2.0 * head - cb
        gh[i] = head


@njit(**_HELPER)
def _junctions(Av, Bv, g0, g1, g2, eptr, esec, einv, gbs, gh):  # pragma: no cover - compiled
    """Junctions of one arriving and two leaving pipes (groups ``g0 .. g1-1``) and of one arriving
    and three leaving (``g1 .. g2-1``), written out: heads into ``gh``, ghosts ``2 H - C`` into the
    pipe-end sections. Their pipe ends are consecutive, the arriving one first (the canonical
    order)."""
    base = eptr[g0]
    for i in range(g1 - g0):
        e = base + 3 * i
        k0 = esec[e]
        k1 = esec[e + 1]
        k2 = esec[e + 2]
        c0 = Av[k0]
        c1 = Bv[k1]
        c2 = Bv[k2]
        head = (((0.0 + c0 * einv[e]) + c1 * einv[e + 1]) + c2 * einv[e + 2]) * gbs[g0 + i]
        gh[g0 + i] = head
        two_h = 2.0 * head
        Bv[k0] = two_h - c0
        Av[k1] = two_h - c1
        Av[k2] = two_h - c2
    base = eptr[g1]
    for i in range(g2 - g1):
        e = base + 4 * i
        k0 = esec[e]
        k1 = esec[e + 1]
        k2 = esec[e + 2]
        k3 = esec[e + 3]
        c0 = Av[k0]
        c1 = Bv[k1]
        c2 = Bv[k2]
        c3 = Bv[k3]
        head = (
            (((0.0 + c0 * einv[e]) + c1 * einv[e + 1]) + c2 * einv[e + 2]) + c3 * einv[e + 3]
        ) * gbs[g1 + i]
        gh[g1 + i] = head
        two_h = 2.0 * head
        Bv[k0] = two_h - c0
        Av[k1] = two_h - c1
        Av[k2] = two_h - c2
        Av[k3] = two_h - c3


@njit(**_HELPER)
def _fans(Av, Bv, g0, g1, eptr, esec, einv, gbs, gh):  # pragma: no cover - compiled
    """Junctions of one arriving pipe and any number leaving (groups ``g0 .. g1-1``; the arriving
    pipe's end first), as :func:`_junctions` with a loop over the leaving pipes."""
    for gi in range(g0, g1):
        e0 = eptr[gi]
        e1 = eptr[gi + 1]
        k0 = esec[e0]
        c0 = Av[k0]
        scb = 0.0 + c0 * einv[e0]
        for e in range(e0 + 1, e1):
            scb += Bv[esec[e]] * einv[e]
        head = scb * gbs[gi]
        gh[gi] = head
        two_h = 2.0 * head
        Bv[k0] = two_h - c0
        for e in range(e0 + 1, e1):
            k = esec[e]
            Av[k] = two_h - Bv[k]


@njit(**_HELPER)
def _other_nodes(S, g0, g1, eptr, ein0, eout0, edir, j, einv, gbs, gh):  # pragma: no cover
    """The other plain junctions ``g0 .. g1-1`` (pipe ends in the canonical order) on the storage
    ``S`` at step ``j`` of the current placement: pipe end ``e`` brings ``S[ein0[e] + edir[e] j]``
    and receives the ghost ``2 H - C`` at ``S[eout0[e] - edir[e] j]``."""
    for gi in range(g0, g1):
        e0 = eptr[gi]
        e1 = eptr[gi + 1]
        scb = 0.0
        for e in range(e0, e1):
            scb += S[np.uint64(ein0[e] + edir[e] * j)] * einv[e]
        head = scb * gbs[gi]
        gh[gi] = head
        two_h = 2.0 * head
        for e in range(e0, e1):
            d = edir[e] * j
            S[np.uint64(eout0[e] - d)] = two_h - S[np.uint64(ein0[e] + d)]


@njit(**_HELPER)
def _check_plain(gh, gthr, gmax, gmin, n_plain, chunk_bad):  # pragma: no cover - compiled
    """Peaks of the plain junctions whose head is at or above its threshold (vapour head, or +inf
    while the junction holds a cavity) and within :data:`HEAD_LIMIT_M`; per chunk of
    :data:`NODE_CHUNK` junctions, how many are not (the general solver redoes them). Returns the
    total."""
    total = 0
    for c in range(len(chunk_bad)):
        lo = c * NODE_CHUNK
        hi = min(lo + NODE_CHUNK, n_plain)
        h_v = gh[lo:hi]
        t_v = gthr[lo:hi]
        mx_v = gmax[lo:hi]
        mn_v = gmin[lo:hi]
        nbad = 0
        for i in range(hi - lo):
            h = h_v[i]
            good = (h >= t_v[i]) & (h <= HEAD_LIMIT_M)
            nbad += not good
            mx = mx_v[i]
            mx_v[i] = h if (good & (h > mx)) else mx
            mn = mn_v[i]
            mn_v[i] = h if (good & (h < mn)) else mn
        chunk_bad[c] = nbad
        total += nbad
    return total


@njit(**_HELPER)
def _arrived(a, b, r):  # pragma: no cover - compiled
    """The characteristics ``(C_P, C_M)`` a liquid section received, from the two it sent, ``a =
    C_P - R' q|q|`` and ``b = C_M + R' q|q|`` with ``q = (C_P - C_M)/2``: ``a + b = C_P + C_M``, and
    ``e = (a - b)/2 = q - R' q|q|`` gives ``q = 2 e/(1 + sqrt(1 - 4 R'|e|))`` (the root that tends
    to ``e`` as ``R'`` goes to 0). The map from ``q`` to ``e`` turns back at ``R'|q| = 1/2``, so this
    holds while ``R'|q| = f dt V/(2 D)`` stays under 1/2: in building piping it is about 0.002 at
    1 ms. It is used only in the step where a pipe first falls below its vapour head; a pipe that
    holds cavities keeps what it received (``Sa``, ``Sb`` in :func:`run`)."""
    e = 0.5 * (a - b)
    q = 2.0 * e / (1.0 + math.sqrt(max(1.0 - 4.0 * r * abs(e), 0.0)))
    h = 0.5 * (a + b)
    return h + q, h - q


@njit(**_HELPER)
def _flagged(p, Av, Bv, off, nre, hv0, dhv, cav_on):  # pragma: no cover - compiled
    """Whether an interior section of liquid pipe p fell below its vapour head (or beyond the limit,
    or is not finite) in this step; after the flat update, ``Av[k] + Bv[k]`` is still ``C_P +
    C_M`` (to rounding), and the two values sent are bounded as well (where friction runs away,
    their sum cancels)."""
    o = off[p]
    for k in range(o + 1, o + nre[p]):
        a = Av[k]
        b = Bv[k]
        h = 0.5 * (a + b)
        thr = hv0[p] + dhv[p] * (k - o) if cav_on else -HEAD_LIMIT_M
        if not (
            h >= thr and h <= HEAD_LIMIT_M and abs(a) <= SENT_LIMIT_M and abs(b) <= SENT_LIMIT_M
        ):
            return True
    return False


@njit(**_HELPER)
def _pipe_with_cavities(
    p,
    step,
    dt,
    psi,
    cav_on,
    Av,
    Bv,
    kept,
    Sa,
    Sb,
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
    """DVCM update of the interior of pipe ``p``, after the flat update treated it as liquid;
    returns its number of open (or closing) cavities.

    The characteristics each section received are in ``Sa``, ``Sb`` where ``kept`` (a pipe that
    held cavities before this step), else recovered by :func:`_arrived`; a section that stays
    liquid keeps what the flat update wrote. Flows are scaled (``q = B Q``); the cavity volume
    uses real flows ``(qd - qu)/B``. A section with a cavity keeps its two flows in ``Qcu``,
    ``Qcd``; its outgoing characteristics use the downstream-side flow for ``C+`` and the
    upstream-side flow for ``C-``.
    """
    n = nre[p]
    o = off[p]
    inv_b = 1.0 / bco[p]
    r = rco[p]
    count = 0
    for k in range(o + 1, o + n):
        j = k - o
        v_old = Vc[k]
        if v_old < 0.0:  # JUST_CLOSED last step: liquid now
            v_old = 0.0
        a = Sa[k] if kept else Av[k]
        b = Sb[k] if kept else Bv[k]
        h2 = a + b
        if not (
            abs(h2) <= 2.0 * HEAD_LIMIT_M and abs(a) <= SENT_LIMIT_M and abs(b) <= SENT_LIMIT_M
        ):
            stats[ST_STATUS] = STATUS_PIPE_NONFINITE
            stats[ST_WHERE] = p
            return count
        hv = hv0[p] + dhv[p] * j
        if cav_on and (v_old > 0.0 or 0.5 * h2 < hv - 1e-6):
            cp, cm = (a, b) if kept else _arrived(a, b, r)
            qu = cp - hv
            qd = hv - cm
            old_rate = (Qcd[k] - Qcu[k]) * inv_b if v_old > 0.0 else 0.0
            vol = v_old + dt * (psi * (qd - qu) * inv_b + (1.0 - psi) * old_rate)
            if vol > 0.0:
                Hf[k] = hv
                Av[k] = hv + qd - r * qd * abs(qd)
                Bv[k] = hv - qu + r * qu * abs(qu)
                Qcu[k] = qu
                Qcd[k] = qd
                Vc[k] = vol
                count += 1
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
                Av[k] = h + qd - r * qd * abs(qd)
                Bv[k] = h - qu + r * qu * abs(qu)
                Vc[k] = JUST_CLOSED
                count += 1  # its two flows still differ: keep the pipe on this path one more step
                stats[ST_COLLAPSES] += 1
                if stats[ST_FIRST_COLLAPSE] < 0:
                    stats[ST_FIRST_COLLAPSE] = step
                continue
        Vc[k] = 0.0  # liquid: the flat update stands
    return count


@njit(**_HELPER)
def _block_threshold(b, block_pipe, nre, hv0, dhv, cavcount, cav_on):  # pragma: no cover
    """Highest vapour head of an interior section of a liquid pipe in block ``b`` (a bound for
    the flat check; the pipes are then checked section by section)."""
    thr = -HEAD_LIMIT_M
    if not cav_on:
        return thr
    for p in range(block_pipe[b], block_pipe[b + 1]):
        n = nre[p]
        if n < 2 or cavcount[p] > 0:
            continue
        thr = max(thr, hv0[p] + dhv[p] * 1, hv0[p] + dhv[p] * (n - 1))
    return thr


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
    block_pipe,
    pipe_rank,
    n_plain,
    node_classes,
    gkind,
    gfixed,
    ghv,
    gbs,
    ghead0,
    group_rank,
    eptr,
    esgn,
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
    wsec,
    wpipe,
    wmax_first,
    wmax_after,
    wmin,
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
    ``2 N``); ``rco`` is scaled (``R/B^2``) per pipe, ``sr`` per section (single precision);
    ``bco`` is ``B`` per pipe.
    Per pipe end: ``esec`` its section, ``esgn`` +1 at a pipe's last section, -1 at its first. The
    plain junctions (groups ``0 .. n_plain-1``) come in classes starting at ``0`` and at
    ``node_classes``: see :func:`_end_nodes`, :func:`_junctions`, :func:`_fans` and
    :func:`_other_nodes`.
    ``pipe_rank`` and ``group_rank`` give the order of the final sums. ``wsec`` are watched
    interior sections (of layout pipes ``wpipe``): their highest head before and after the first
    cavity collapse and their lowest (not below the section's vapour head) go to ``wmax_first``,
    ``wmax_after``, ``wmin`` (the places of nodes merged into a longer pipe,
    :mod:`knockproof.transient.series`). Returns (section heads, arrestor gas volumes, cavity
    volume left).
    """
    ns = len(sr)
    # storage (module docstring): C+ drifts down and C- up one place per step, so that a section
    # reads and writes the same two places; moved back every `span` steps
    span = max(1, min(n_steps, max(REBASE_STEPS, ns)))
    half = ns + span + 2
    S = np.empty(2 * half)
    S[span + 1 : span + 1 + ns] = state0[:ns]
    S[half : half + ns] = state0[ns:]
    Vc = np.zeros(ns)
    Sa = np.zeros(ns)  # what the sections of pipes holding cavities received, this step
    Sb = np.zeros(ns)
    Qcu = np.zeros(ns)
    Qcd = np.zeros(ns)
    Hf = np.zeros(ns)
    gthr = ghv.copy()
    n_groups = len(gkind)
    n_pipes = len(off)
    n_blocks = len(block_pipe) - 1
    block_of = np.empty(n_pipes, dtype=np.int64)
    block_thr = np.empty(n_blocks)
    block_bad = np.zeros(n_blocks, dtype=np.int64)
    cavcount = np.zeros(n_pipes, dtype=np.int64)
    for b in range(n_blocks):
        block_of[block_pipe[b] : block_pipe[b + 1]] = b
        block_thr[b] = _block_threshold(b, block_pipe, nre, hv0, dhv, cavcount, cav_on)
    chunk_bad = np.zeros((n_plain + NODE_CHUNK - 1) // NODE_CHUNK, dtype=np.int64)
    deferred = np.zeros(n_groups, dtype=np.int64)
    cvb = np.zeros(len(vq0))
    vq = vq0.copy()
    avol = avol0.copy()
    aq = np.zeros(len(avol0))
    gvol = np.zeros(n_groups)
    gnet = np.zeros(n_groups)
    gh = ghead0.copy()
    todo = np.zeros(n_pipes, dtype=np.int64)  # pipes on the DVCM path this step, increasing
    active = np.zeros(n_pipes, dtype=np.int64)  # pipes holding cavities, increasing
    n_active = 0
    n_todo = 0
    esec_u = esec.astype(np.uint64)  # unsigned: see _end_nodes
    # where a pipe end reads and writes in S at step j of a placement: C_P (last section) from the
    # C+ half, C_M (first section) from the C- half; the ghost goes to the other half
    n_ends = len(esec)
    ein0 = np.empty(n_ends, dtype=np.int64)
    eout0 = np.empty(n_ends, dtype=np.int64)
    edir = np.empty(n_ends, dtype=np.int64)
    for e in range(n_ends):
        if esgn[e] > 0.0:
            ein0[e] = esec[e] + span + 1
            eout0[e] = esec[e] + half
            edir[e] = -1
        else:
            ein0[e] = esec[e] + half
            eout0[e] = esec[e] + span + 1
            edir[e] = 1
    stats[ST_FIRST_COLLAPSE] = -1
    for gi in range(n_groups):
        gmax_first[gi] = ghead0[gi]
        gmin[gi] = ghead0[gi]
        gmax_after[gi] = -np.inf
    for r in range(len(rec_groups)):
        rec_out[0, r] = ghead0[rec_groups[r]]
    n_watch = len(wsec)
    for w in range(n_watch):  # the initial state: C+ + C- = 2 H at a liquid section
        k = wsec[w]
        h = 0.5 * (state0[k] + state0[ns + k])
        wmax_first[w] = h
        wmax_after[w] = -np.inf
        wmin[w] = h
    supply_old = acc[ACC_SUPPLY]
    j = 0
    for step in range(1, n_steps + 1):
        t = step * dt
        last = step == n_steps
        gmax = gmax_after if stats[ST_FIRST_COLLAPSE] >= 0 else gmax_first
        j += 1
        if j > span:  # move the state back to its starting place
            for k in range(ns - 1, -1, -1):
                S[span + 1 + k] = S[1 + k]
            for k in range(ns):
                S[half + k] = S[half + span + k]
            j = 1
        # Av[k], Bv[k]: what arrives at section k (C_P = C+ of k-1, C_M = C- of k+1), then what
        # it sends
        Av = S[span + 1 - j : span + 1 - j + ns]
        Bv = S[half + j : half + j + ns]
        # 1. the plain junctions: heads and ghosts; checked, and the general solver for those that
        # fail and for the reservoirs, valves and arrestors
        _end_nodes(Av, Bv, node_classes[0], node_classes[1], node_classes[2], esec_u, einv, gbs, gh)
        _junctions(
            Av, Bv, node_classes[2], node_classes[3], node_classes[4], eptr, esec_u, einv, gbs, gh
        )
        _fans(Av, Bv, node_classes[4], node_classes[5], eptr, esec_u, einv, gbs, gh)
        _other_nodes(S, node_classes[5], n_plain, eptr, ein0, eout0, edir, j, einv, gbs, gh)
        nd = 0
        if _check_plain(gh, gthr, gmax, gmin, n_plain, chunk_bad) > 0:
            for c in range(len(chunk_bad)):
                if chunk_bad[c] > 0:
                    for gi in range(c * NODE_CHUNK, min((c + 1) * NODE_CHUNK, n_plain)):
                        h = gh[gi]
                        if not (h >= gthr[gi] and h <= HEAD_LIMIT_M):
                            deferred[nd] = gi
                            nd += 1
        for v in range(len(vq0)):  # the valves' discharge coefficients at this time
            if vq0[v] > 0.0:
                tau = area_ratio(vfam[v], vexp[v], vtc[v], vt0[v], t)
                cvb[v] = (tau * vq0[v]) ** 2 / vdh0[v]
            else:
                cvb[v] = 0.0
        supply = 0.0
        for m in range(nd + n_groups - n_plain):
            # the general node equations of _special_node: a plain junction whose head failed its
            # check, or a reservoir, valve or arrestor (written out here: a call with this many
            # arrays as arguments costs more than the work)
            gi = deferred[m] if m < nd else n_plain + m - nd
            e0 = eptr[gi]
            e1 = eptr[gi + 1]
            scb = 0.0
            for e in range(e0, e1):
                k = esec[e]
                scb += (Av[k] if esgn[e] > 0.0 else Bv[k]) * einv[e]
            bs = gbs[gi]
            cs = scb * bs
            kind = gkind[gi]
            # a constant-head node needs no call (an event's zone has several: its cut nodes)
            head = (
                gfixed[gi]
                if kind == 1
                else _special_node(
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
            )
            if not (abs(head) <= HEAD_LIMIT_M):
                stats[ST_STATUS] = STATUS_NODE_NONFINITE
                stats[ST_WHERE] = gi
            if stats[ST_STATUS] != STATUS_OK:
                break
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
                k = esec[e]
                if esgn[e] > 0.0:
                    Bv[k] = 2.0 * head - Av[k]
                else:
                    Av[k] = 2.0 * head - Bv[k]
            gh[gi] = head
            if head > gmax[gi]:
                gmax[gi] = head
            if head < gmin[gi]:
                gmin[gi] = head
        acc[ACC_SUPPLY] = supply
        if stats[ST_STATUS] != STATUS_OK:
            stats[ST_STEP] = step
            break
        # 2. every section, block by block (a block's threshold bounds the vapour heads of its
        # liquid pipes); first, what the pipes holding cavities receive is kept for step 3
        for m in range(n_active):
            p = active[m]
            for k in range(off[p] + 1, off[p] + nre[p]):
                Sa[k] = Av[k]
                Sb[k] = Bv[k]
        nbad = 0
        for b in range(n_blocks):
            k0 = off[block_pipe[b]]
            k1 = off[block_pipe[b + 1]] if b + 1 < n_blocks else ns
            block_bad[b] = _flat_block(Av, Bv, sr, k0, k1, block_thr[b], Hf, last)
            nbad += block_bad[b]
        # 3. DVCM: pipes newly below their vapour head (found in the blocks that have some),
        # merged in increasing order with those holding cavities
        n_todo = 0
        if nbad > 0 or n_active > 0:
            i = 0
            for b in range(n_blocks):
                if block_bad[b] == 0:
                    continue
                for p in range(block_pipe[b], block_pipe[b + 1]):
                    if nre[p] < 2 or cavcount[p] > 0:
                        continue
                    if not _flagged(p, Av, Bv, off, nre, hv0, dhv, cav_on):
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
                    Av,
                    Bv,
                    cavcount[p] > 0,
                    Sa,
                    Sb,
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
                    cavcount[p] = count
                    b = block_of[p]
                    block_thr[b] = _block_threshold(b, block_pipe, nre, hv0, dhv, cavcount, cav_on)
                cavcount[p] = count
                if count > 0:
                    active[n_active] = p
                    n_active += 1
        if stats[ST_STATUS] != STATUS_OK:
            stats[ST_STEP] = step
            break
        acc[ACC_SUPPLY_VOLUME] += 0.5 * dt * (supply_old + acc[ACC_SUPPLY])
        supply_old = acc[ACC_SUPPLY]
        for w in range(n_watch):
            # what a section sends sums to 2 H when it is liquid; with a cavity open the head is
            # the vapour head (the two flows differ), which bounds the lowest
            k = wsec[w]
            p = wpipe[w]
            h = 0.5 * (Av[k] + Bv[k])
            hv = hv0[p] + dhv[p] * (k - off[p])
            if cav_on and (Vc[k] > 0.0 or h < hv):
                h = hv
            if stats[ST_FIRST_COLLAPSE] >= 0 and stats[ST_FIRST_COLLAPSE] < step:
                if h > wmax_after[w]:
                    wmax_after[w] = h
            elif h > wmax_first[w]:
                wmax_first[w] = h
            if h < wmin[w]:
                wmin[w] = h
        if step % rec_every == 0:
            row = step // rec_every
            for r in range(len(rec_groups)):
                rec_out[row, r] = gh[rec_groups[r]]
    for gi in range(n_groups):
        for e in range(eptr[gi], eptr[gi + 1]):
            Hf[esec[e]] = gh[gi]
    total_cavity = 0.0
    for p in pipe_rank:
        for k in range(off[p], off[p] + nre[p] + 1):
            if Vc[k] > 0.0:
                total_cavity += Vc[k]
    for gi in group_rank:
        total_cavity += gvol[gi]
    return Hf, avol, total_cavity
