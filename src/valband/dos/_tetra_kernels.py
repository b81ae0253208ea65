"""Kernels of the linear tetrahedron method: numba kernels and plain-numpy references.

Formulas (Blöchl, Jepsen & Andersen, Phys. Rev. B 49, 16223 (1994), Appendix B and
Sec. IV), written for the corner energies of one tetrahedron sorted as a0 ≤ a1 ≤ a2 ≤ a3 and
normalised to a tetrahedron of unit volume fraction (the caller divides by 6·nfull):

* integration weights w_r(E) = ∫_T Θ(E − ε) λ_r, with λ_r the barycentric coordinate of
  corner r; Σ_r w_r is the linear count N_T(E);
* delta-function weights d_r(E) = dw_r/dE = ∫_T δ(E − ε) λ_r; Σ_r d_r is the linear DOS
  D_T(E), so projected DOS built from them sum to the total;
* Blöchl's correction δw_r = D_T(E)/40 · Σ_s (a_s − a_r), which sums to zero over the four
  corners (it conserves the electron count and only changes integrals of k-dependent
  quantities such as the band energy).

Energy ranges: region A  a0 < E ≤ a1, region B  a1 < E ≤ a2, region C  a2 < E ≤ a3.
Each formula is used only where its denominators are non-zero (a degenerate pair empties
its region), so no special cases are needed.

The numba kernels loop over mesh cubes, look up the eight corner rows through ``ir_map`` on
the fly (periodic wrap-around) and never hold full-mesh arrays; they run in parallel over
the slowest mesh index i2 with one private accumulator row per i2. Inside each region the
delta weights are cubic polynomials in E; the DOS kernel builds their coefficients once per
tetrahedron and region and evaluates them by Horner's rule (no division per energy point).
The numpy references
build every tetrahedron explicitly (memory ∝ mesh size) and compute the delta-function
weights by a separate geometric route (area-weighted barycentric centroid of the
constant-energy cross-section), so the two implementations check each other.
"""

from __future__ import annotations

import math

import numba
import numpy as np
from numpy.typing import NDArray

__all__ = [
    "tetra_dos_numba",
    "tetra_dos_reference",
    "tetra_integrate_numba",
    "tetra_integrate_reference",
    "tetra_count_reference",
    "full_index",
]


def full_index(i0, i1, i2, mesh):
    """Full-mesh index i0 + m0·(i1 + m1·i2) (spglib's grid order); works on arrays."""
    return i0 + mesh[0] * (i1 + mesh[1] * i2)


# --------------------------------------------------------------------------- numba helpers
@numba.njit(cache=True, inline="always")
def _sort4(e, perm):  # pragma: no cover
    """Insertion sort of the four values e in place, carrying the permutation perm."""
    for i in range(1, 4):
        v = e[i]
        p = perm[i]
        j = i - 1
        while j >= 0 and e[j] > v:
            e[j + 1] = e[j]
            perm[j + 1] = perm[j]
            j -= 1
        e[j + 1] = v
        perm[j + 1] = p


@numba.njit(cache=True)
def _poly_a(a0, a1, a2, a3, c):  # pragma: no cover
    """Region A (a0 < E ≤ a1): d_r = Σ_p c[r, p] u^p with u = E − a0."""
    k = 1.0 / ((a1 - a0) * (a2 - a0) * (a3 - a0))
    k1 = k / (a1 - a0)
    k2 = k / (a2 - a0)
    k3 = k / (a3 - a0)
    for r in range(4):
        for p in range(4):
            c[r, p] = 0.0
    c[0, 2] = 3.0 * k
    c[0, 3] = -(k1 + k2 + k3)
    c[1, 3] = k1
    c[2, 3] = k2
    c[3, 3] = k3


@numba.njit(cache=True)
def _poly_c(a0, a1, a2, a3, c):  # pragma: no cover
    """Region C (a2 < E ≤ a3): d_r = Σ_p c[r, p] v^p with v = a3 − E."""
    q = 1.0 / ((a3 - a0) * (a3 - a1) * (a3 - a2))
    q0 = q / (a3 - a0)
    q1 = q / (a3 - a1)
    q2 = q / (a3 - a2)
    for r in range(4):
        for p in range(4):
            c[r, p] = 0.0
    c[0, 3] = q0
    c[1, 3] = q1
    c[2, 3] = q2
    c[3, 2] = 3.0 * q
    c[3, 3] = -(q0 + q1 + q2)


@numba.njit(cache=True, inline="always")
def _lin(p0, p1, p2, p3, c0, c1, s):  # pragma: no cover
    """s · p(t) · (c0 + c1 t) for the cubic p = p0 + p1 t + p2 t² + p3 t³ (5 coefficients)."""
    return (
        s * c0 * p0,
        s * (c0 * p1 + c1 * p0),
        s * (c0 * p2 + c1 * p1),
        s * (c0 * p3 + c1 * p2),
        s * c1 * p3,
    )


@numba.njit(cache=True, inline="always")
def _deriv_into(c, r, wa, wb):  # pragma: no cover
    """c[r, :] = d/dt of the quartic wa + wb (two 5-tuples of coefficients)."""
    c[r, 0] = wa[1] + wb[1]
    c[r, 1] = 2.0 * (wa[2] + wb[2])
    c[r, 2] = 3.0 * (wa[3] + wb[3])
    c[r, 3] = 4.0 * (wa[4] + wb[4])


@numba.njit(cache=True)
def _poly_b(a0, a1, a2, a3, c):  # pragma: no cover
    """Region B (a1 < E ≤ a2): d_r = Σ_p c[r, p] t^p with t = E − a1.

    Blöchl's weights w_r (Appendix B) are written as quartics in t, from
    x0 = e10 + t, x1 = t, y2 = e21 − t, y3 = e31 − t, and differentiated.
    """
    e10 = a1 - a0
    e20 = a2 - a0
    e30 = a3 - a0
    e21 = a2 - a1
    e31 = a3 - a1
    i1 = 1.0 / (4.0 * e30 * e20)
    i2 = 1.0 / (4.0 * e30 * e21 * e20)
    i3 = 1.0 / (4.0 * e31 * e21 * e30)
    r20 = 1.0 / e20
    r30 = 1.0 / e30
    r21 = 1.0 / e21
    r31 = 1.0 / e31
    # C1 = i1 x0², C2 = i2 x0 x1 y2, C3 = i3 x1² y3 as cubics in t
    p10, p11, p12 = i1 * e10 * e10, 2.0 * i1 * e10, i1
    p21, p22, p23 = i2 * e10 * e21, i2 * (e21 - e10), -i2
    p32, p33 = i3 * e31, -i3
    # sums C1+C2, C2+C3, C1+C2+C3
    q0, q1, q2, q3 = p10, p11 + p21, p12 + p22, p23
    s0, s1, s2, s3 = 0.0, p21, p22 + p32, p23 + p33
    u0, u1, u2, u3 = p10, p11 + p21, p12 + p22 + p32, p23 + p33
    # w0 = C1 + (C1+C2) y2/e20 + (C1+C2+C3) y3/e30
    wa = _lin(q0, q1, q2, q3, e21, -1.0, r20)
    wb = _lin(u0, u1, u2, u3, e31, -1.0, r30)
    c[0, 0] = p11 + wa[1] + wb[1]
    c[0, 1] = 2.0 * (p12 + wa[2] + wb[2])
    c[0, 2] = 3.0 * (wa[3] + wb[3])
    c[0, 3] = 4.0 * (wa[4] + wb[4])
    # w1 = C1+C2+C3 + (C2+C3) y2/e21 + C3 y3/e31
    wa = _lin(s0, s1, s2, s3, e21, -1.0, r21)
    wb = _lin(0.0, 0.0, p32, p33, e31, -1.0, r31)
    c[1, 0] = u1 + wa[1] + wb[1]
    c[1, 1] = 2.0 * (u2 + wa[2] + wb[2])
    c[1, 2] = 3.0 * (u3 + wa[3] + wb[3])
    c[1, 3] = 4.0 * (wa[4] + wb[4])
    # w2 = (C1+C2) x0/e20 + (C2+C3) x1/e21
    _deriv_into(c, 2, _lin(q0, q1, q2, q3, e10, 1.0, r20), _lin(s0, s1, s2, s3, 0.0, 1.0, r21))
    # w3 = (C1+C2+C3) x0/e30 + C3 x1/e31
    _deriv_into(c, 3, _lin(u0, u1, u2, u3, e10, 1.0, r30), _lin(0.0, 0.0, p32, p33, 0.0, 1.0, r31))


@numba.njit(cache=True)
def _dos_only(a0, a1, a2, a3, en):  # pragma: no cover
    """Linear tetrahedron DOS D_T at energy en (no corner weights)."""
    if en <= a0 or en > a3:
        return 0.0
    if en <= a1:
        x0 = en - a0
        return 3.0 * x0 * x0 / ((a1 - a0) * (a2 - a0) * (a3 - a0))
    if en <= a2:
        x1 = en - a1
        e20 = a2 - a0
        e31 = a3 - a1
        return (3.0 * (a1 - a0) + 6.0 * x1 - 3.0 * (e20 + e31) * x1 * x1 / ((a2 - a1) * e31)) / (
            e20 * (a3 - a0)
        )
    y3 = a3 - en
    return 3.0 * y3 * y3 / ((a3 - a0) * (a3 - a1) * (a3 - a2))


@numba.njit(cache=True)
def _integration_weights(a0, a1, a2, a3, en, w):  # pragma: no cover
    """Blöchl's integration weights w[0:4] at energy en (linear part only)."""
    if en <= a0:
        for r in range(4):
            w[r] = 0.0
        return
    if en >= a3:
        for r in range(4):
            w[r] = 0.25
        return
    if en <= a1:
        x0 = en - a0
        e10 = a1 - a0
        e20 = a2 - a0
        e30 = a3 - a0
        c = x0 * x0 * x0 / (4.0 * e10 * e20 * e30)
        w[0] = c * (4.0 - x0 * (1.0 / e10 + 1.0 / e20 + 1.0 / e30))
        w[1] = c * x0 / e10
        w[2] = c * x0 / e20
        w[3] = c * x0 / e30
        return
    if en <= a2:
        x0 = en - a0
        x1 = en - a1
        y2 = a2 - en
        y3 = a3 - en
        e20 = a2 - a0
        e30 = a3 - a0
        e21 = a2 - a1
        e31 = a3 - a1
        c1 = x0 * x0 / (4.0 * e30 * e20)
        c2 = x0 * x1 * y2 / (4.0 * e30 * e21 * e20)
        c3 = x1 * x1 * y3 / (4.0 * e31 * e21 * e30)
        w[0] = c1 + (c1 + c2) * y2 / e20 + (c1 + c2 + c3) * y3 / e30
        w[1] = c1 + c2 + c3 + (c2 + c3) * y2 / e21 + c3 * y3 / e31
        w[2] = (c1 + c2) * x0 / e20 + (c2 + c3) * x1 / e21
        w[3] = (c1 + c2 + c3) * x0 / e30 + c3 * x1 / e31
        return
    y3 = a3 - en
    e30 = a3 - a0
    e31 = a3 - a1
    e32 = a3 - a2
    c = y3 * y3 * y3 / (4.0 * e30 * e31 * e32)
    w[0] = 0.25 - c * y3 / e30
    w[1] = 0.25 - c * y3 / e31
    w[2] = 0.25 - c * y3 / e32
    w[3] = 0.25 - c * (4.0 - y3 * (1.0 / e30 + 1.0 / e31 + 1.0 / e32))


@numba.njit(cache=True, inline="always")
def _cube_corners(i0, i1, i2, m0, m1, m2, ir_map, rows):  # pragma: no cover
    """Rows (in the irreducible arrays) of the eight corners of cube (i0, i1, i2)."""
    for code in range(8):
        j0 = (i0 + (code & 1)) % m0
        j1 = (i1 + ((code >> 1) & 1)) % m1
        j2 = (i2 + ((code >> 2) & 1)) % m2
        rows[code] = ir_map[j0 + m0 * (j1 + m1 * j2)]


# --------------------------------------------------------------------------- numba kernels
@numba.njit(cache=True, inline="always")
def _first_above(a, e_first, de, ne):  # pragma: no cover
    """Index of the first grid energy above a, clipped to [0, ne]."""
    j = int(math.floor((a - e_first) / de)) + 1
    return min(max(j, 0), ne)


@numba.njit(cache=True, inline="always")
def _sort_rows4(r):  # pragma: no cover
    """Sort four integers ascending in place (a 5-comparator network)."""
    if r[0] > r[1]:
        r[0], r[1] = r[1], r[0]
    if r[2] > r[3]:
        r[2], r[3] = r[3], r[2]
    if r[0] > r[2]:
        r[0], r[2] = r[2], r[0]
    if r[1] > r[3]:
        r[1], r[3] = r[3], r[1]
    if r[1] > r[2]:
        r[1], r[2] = r[2], r[1]


@numba.njit(cache=True, parallel=True)
def _tetra_keys(m0, m1, m2, tets, ir_map, nir, single, k1, k2):  # pragma: no cover
    """Key(s) of the sorted irreducible corner rows of every tetrahedron of the mesh.

    ``single``: one int64 key r0·n³ + r1·n² + r2·n + r3 in k1 (needs n⁴ < 2⁶³); otherwise
    k1 = r0·n + r1 and k2 = r2·n + r3.
    """
    for i2 in numba.prange(m2):
        rows = np.empty(8, dtype=np.int64)
        r = np.empty(4, dtype=np.int64)
        for i1 in range(m1):
            for i0 in range(m0):
                _cube_corners(i0, i1, i2, m0, m1, m2, ir_map, rows)
                base = 6 * (i0 + m0 * (i1 + m1 * i2))
                for t in range(6):
                    for c in range(4):
                        r[c] = rows[tets[t, c]]
                    _sort_rows4(r)
                    if single:
                        k1[base + t] = ((r[0] * nir + r[1]) * nir + r[2]) * nir + r[3]
                    else:
                        k1[base + t] = r[0] * nir + r[1]
                        k2[base + t] = r[2] * nir + r[3]


def irreducible_tetrahedra(mesh, tets, ir_map, nir):
    """Distinct tetrahedra of the mesh by their irreducible corners, with multiplicities.

    Tetrahedra whose corners map to the same irreducible points carry identical energies
    and projections, so each class is integrated once and weighted by its size
    (Blöchl, Jepsen & Andersen, Phys. Rev. B 49, 16223 (1994), Sec. III).

    Returns
    -------
    rows : int64 (n_classes, 4), sorted corner rows into the irreducible arrays
    mult : float64 (n_classes,), number of mesh tetrahedra in each class
    """
    m0, m1, m2 = (int(x) for x in mesh)
    n_tet = 6 * m0 * m1 * m2
    nir = int(nir)
    single = nir**4 < 2**62
    k1 = np.empty(n_tet, dtype=np.int64)
    k2 = np.empty(n_tet if not single else 0, dtype=np.int64)
    _tetra_keys(m0, m1, m2, _tet_codes(tets), ir_map, nir, single, k1, k2)
    if single:
        keys, mult = np.unique(k1, return_counts=True)
        del k1
        rows = np.empty((keys.size, 4), dtype=np.int64)
        for c in range(3, -1, -1):
            rows[:, c] = keys % nir
            keys //= nir
    else:
        order = np.lexsort((k2, k1))
        a, b = k1[order], k2[order]
        first = np.ones(n_tet, dtype=bool)
        first[1:] = (a[1:] != a[:-1]) | (b[1:] != b[:-1])
        starts = np.flatnonzero(first)
        mult = np.diff(np.append(starts, n_tet))
        a, b = a[starts], b[starts]
        rows = np.stack([a // nir, a % nir, b // nir, b % nir], axis=1)
    return np.ascontiguousarray(rows), mult.astype(np.float64)


@numba.njit(cache=True, parallel=True)
def _dos_kernel(rows, mult, eig, proj, energies, with_ch, out_tot, out_ch):  # pragma: no cover
    """Accumulate the DOS of tetrahedron classes; slot s of the outputs is thread-private."""
    ne = energies.size
    nb = eig.shape[1]
    nch = proj.shape[2]
    e_first = energies[0]
    de = (energies[ne - 1] - e_first) / (ne - 1)
    nslot = out_tot.shape[0]
    nt = rows.shape[0]
    per = (nt + nslot - 1) // nslot
    for slot in numba.prange(nslot):
        e = np.empty(4)
        perm = np.empty(4, dtype=np.int64)
        coef = np.empty((4, 4))
        dbuf = np.empty((4, ne))
        bounds = np.empty(4, dtype=np.int64)
        for t in range(slot * per, min(nt, (slot + 1) * per)):
            wt = mult[t]
            for b in range(nb):
                for r in range(4):
                    e[r] = eig[rows[t, r], b]
                    perm[r] = rows[t, r]
                if max(max(e[0], e[1]), max(e[2], e[3])) <= e_first:
                    continue
                _sort4(e, perm)
                for r in range(4):
                    bounds[r] = _first_above(e[r], e_first, de, ne)
                jlo = bounds[0]
                jhi = bounds[3]
                if jhi <= jlo:
                    continue
                for reg in range(3):
                    ja = bounds[reg]
                    jb = bounds[reg + 1]
                    if jb <= ja:
                        continue
                    if reg == 0:
                        _poly_a(e[0], e[1], e[2], e[3], coef)
                        origin = e[0]
                        sign = 1.0
                    elif reg == 1:
                        _poly_b(e[0], e[1], e[2], e[3], coef)
                        origin = e[1]
                        sign = 1.0
                    else:
                        _poly_c(e[0], e[1], e[2], e[3], coef)
                        origin = e[3]
                        sign = -1.0
                    if not with_ch:
                        s0 = coef[0, 0] + coef[1, 0] + coef[2, 0] + coef[3, 0]
                        s1 = coef[0, 1] + coef[1, 1] + coef[2, 1] + coef[3, 1]
                        s2 = coef[0, 2] + coef[1, 2] + coef[2, 2] + coef[3, 2]
                        s3 = coef[0, 3] + coef[1, 3] + coef[2, 3] + coef[3, 3]
                        for j in range(ja, jb):
                            u = sign * (energies[j] - origin)
                            out_tot[slot, j] += wt * (((s3 * u + s2) * u + s1) * u + s0)
                        continue
                    c00, c01, c02, c03 = coef[0, 0], coef[0, 1], coef[0, 2], coef[0, 3]
                    c10, c11, c12, c13 = coef[1, 0], coef[1, 1], coef[1, 2], coef[1, 3]
                    c20, c21, c22, c23 = coef[2, 0], coef[2, 1], coef[2, 2], coef[2, 3]
                    c30, c31, c32, c33 = coef[3, 0], coef[3, 1], coef[3, 2], coef[3, 3]
                    for j in range(ja, jb):
                        u = sign * (energies[j] - origin)
                        jj = j - jlo
                        v0 = wt * (((c03 * u + c02) * u + c01) * u + c00)
                        v1 = wt * (((c13 * u + c12) * u + c11) * u + c10)
                        v2 = wt * (((c23 * u + c22) * u + c21) * u + c20)
                        v3 = wt * (((c33 * u + c32) * u + c31) * u + c30)
                        dbuf[0, jj] = v0
                        dbuf[1, jj] = v1
                        dbuf[2, jj] = v2
                        dbuf[3, jj] = v3
                        out_tot[slot, j] += v0 + v1 + v2 + v3
                if not with_ch:
                    continue
                for c in range(nch):
                    p0 = proj[perm[0], b, c]
                    p1 = proj[perm[1], b, c]
                    p2 = proj[perm[2], b, c]
                    p3 = proj[perm[3], b, c]
                    for j in range(jlo, jhi):
                        jj = j - jlo
                        out_ch[slot, c, j] += (
                            dbuf[0, jj] * p0 + dbuf[1, jj] * p1 + dbuf[2, jj] * p2 + dbuf[3, jj] * p3
                        )


@numba.njit(cache=True, parallel=True)
def _integrate_kernel(rows, mult, eig, values, energy, bloechl, out):  # pragma: no cover
    """Σ over tetrahedron classes of mult × Σ_r w_r F_r; slot s of ``out`` is thread-private."""
    nb = eig.shape[1]
    nslot = out.shape[0]
    nt = rows.shape[0]
    per = (nt + nslot - 1) // nslot
    for slot in numba.prange(nslot):
        e = np.empty(4)
        perm = np.empty(4, dtype=np.int64)
        w = np.empty(4)
        acc = 0.0
        for t in range(slot * per, min(nt, (slot + 1) * per)):
            wt = mult[t]
            for b in range(nb):
                for r in range(4):
                    e[r] = eig[rows[t, r], b]
                    perm[r] = rows[t, r]
                lo = min(min(e[0], e[1]), min(e[2], e[3]))
                if energy <= lo:
                    continue
                hi = max(max(e[0], e[1]), max(e[2], e[3]))
                if energy >= hi:  # fully occupied: w = 1/4, correction D_T = 0
                    acc += wt * 0.25 * (
                        values[perm[0], b] + values[perm[1], b]
                        + values[perm[2], b] + values[perm[3], b]
                    )
                    continue
                _sort4(e, perm)
                _integration_weights(e[0], e[1], e[2], e[3], energy, w)
                if bloechl:
                    dt = _dos_only(e[0], e[1], e[2], e[3], energy)
                    s = e[0] + e[1] + e[2] + e[3]
                    for r in range(4):
                        w[r] += dt / 40.0 * (s - 4.0 * e[r])
                for r in range(4):
                    acc += wt * w[r] * values[perm[r], b]
        out[slot] = acc


#: Thread-private accumulator slots of the list kernels (a few per core balances the load).
_SLOTS = 4 * max(1, numba.config.NUMBA_NUM_THREADS)


def _tet_codes(tets: NDArray[np.int64]) -> NDArray[np.int64]:
    """Corner offsets (6, 4, 3) → corner codes o0 + 2·o1 + 4·o2, shape (6, 4)."""
    return np.ascontiguousarray(tets[..., 0] + 2 * tets[..., 1] + 4 * tets[..., 2]).astype(
        np.int64
    )


def tetra_dos_numba(mesh, tets, ir_map, eig, energies, proj, classes=None):
    """Per-spin tetrahedron DOS (numba); inputs validated. Returns (total, channels|None).

    ``classes``: the ``(rows, mult)`` of :func:`irreducible_tetrahedra`, built if None.
    """
    m0, m1, m2 = (int(x) for x in mesh)
    rows, mult = classes if classes is not None else irreducible_tetrahedra(
        mesh, tets, ir_map, eig.shape[0])
    ne = energies.size
    with_ch = proj is not None
    p = proj if with_ch else np.zeros((1, 1, 0))
    nch = p.shape[2]
    out_tot = np.zeros((_SLOTS, ne))
    out_ch = np.zeros((_SLOTS if with_ch else 1, nch, ne))
    _dos_kernel(rows, mult, eig, p, energies, with_ch, out_tot, out_ch)
    norm = 1.0 / (6.0 * m0 * m1 * m2)
    total = out_tot.sum(axis=0) * norm
    channels = out_ch.sum(axis=0) * norm if with_ch else None
    return total, channels


def tetra_integrate_numba(mesh, tets, ir_map, eig, values, energy, bloechl, classes=None):
    """Per-spin Σ_nk w_nk(E) F_nk (numba) with linear or Blöchl-corrected weights."""
    m0, m1, m2 = (int(x) for x in mesh)
    rows, mult = classes if classes is not None else irreducible_tetrahedra(
        mesh, tets, ir_map, eig.shape[0])
    out = np.zeros(_SLOTS)
    _integrate_kernel(rows, mult, eig, values, float(energy), bool(bloechl), out)
    return float(out.sum()) / (6.0 * m0 * m1 * m2)


# --------------------------------------------------------------------------- numpy references
def _all_tetra_rows(mesh, tets, ir_map):
    """Irreducible rows of the four corners of every tetrahedron, shape (6·nfull, 4)."""
    m = np.asarray(mesh, dtype=np.int64)
    i2, i1, i0 = np.meshgrid(np.arange(m[2]), np.arange(m[1]), np.arange(m[0]), indexing="ij")
    origin = np.stack([i0.ravel(), i1.ravel(), i2.ravel()], axis=1)  # (nfull, 3)
    corners = (origin[:, None, None, :] + tets[None, :, :, :]) % m  # (nfull, 6, 4, 3)
    idx = full_index(corners[..., 0], corners[..., 1], corners[..., 2], m)
    return ir_map[idx.reshape(-1, 4)]


def _sorted_tetra(mesh, tets, ir_map, eig):
    rows = _all_tetra_rows(mesh, tets, ir_map)  # (nt, 4)
    nb = eig.shape[1]
    ecorn = np.transpose(eig[rows], (0, 2, 1)).reshape(-1, 4)  # (nt·nb, 4)
    rows_b = np.repeat(rows, nb, axis=0)  # (nt·nb, 4)
    band = np.tile(np.arange(nb), rows.shape[0])
    order = np.argsort(ecorn, axis=1, kind="stable")
    a = np.take_along_axis(ecorn, order, axis=1)
    return a, np.take_along_axis(rows_b, order, axis=1), band


def _ref_dos_t(a, en):
    """Closed-form linear tetrahedron DOS of many tetrahedra at one energy (numpy)."""
    a0, a1, a2, a3 = a.T
    out = np.zeros(a.shape[0])
    with np.errstate(divide="ignore", invalid="ignore"):
        ra = (en > a0) & (en <= a1)
        rb = (en > a1) & (en <= a2)
        rc = (en > a2) & (en <= a3)
        da = 3 * (en - a0) ** 2 / ((a1 - a0) * (a2 - a0) * (a3 - a0))
        x = en - a1
        db = (
            3 * (a1 - a0) + 6 * x - 3 * ((a2 - a0) + (a3 - a1)) * x**2 / ((a2 - a1) * (a3 - a1))
        ) / ((a2 - a0) * (a3 - a0))
        dc = 3 * (a3 - en) ** 2 / ((a3 - a0) * (a3 - a1) * (a3 - a2))
    out[ra] = da[ra]
    out[rb] = db[rb]
    out[rc] = dc[rc]
    return out


def _edge_point(a, r, s, en):
    """Barycentric 4-vectors of the points where ε = en on edges (r, s), many tetrahedra."""
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (en - a[:, r]) / (a[:, s] - a[:, r])
    t = np.nan_to_num(t, nan=0.0, posinf=0.0, neginf=0.0)
    p = np.zeros((a.shape[0], 4))
    p[:, r] = 1.0 - t
    p[:, s] = t
    return p


def _ref_corner_fractions(a, en):
    """Area-weighted mean barycentric coordinates of the cross-section ε = en, (nt, 4)."""
    nt = a.shape[0]
    frac = np.zeros((nt, 4))
    a0, a1, a2, a3 = a.T
    ra = (en > a0) & (en <= a1)
    rc = (en > a2) & (en <= a3)
    rb = (en > a1) & (en <= a2)
    tri_a = (_edge_point(a, 0, 1, en) + _edge_point(a, 0, 2, en) + _edge_point(a, 0, 3, en)) / 3
    tri_c = (_edge_point(a, 3, 0, en) + _edge_point(a, 3, 1, en) + _edge_point(a, 3, 2, en)) / 3
    frac[ra] = tri_a[ra]
    frac[rc] = tri_c[rc]
    p02 = _edge_point(a, 0, 2, en)
    p03 = _edge_point(a, 0, 3, en)
    p13 = _edge_point(a, 1, 3, en)
    p12 = _edge_point(a, 1, 2, en)

    def area(p, q, s):  # area in the (λ1, λ2, λ3) embedding; ratios are affine invariant
        return 0.5 * np.linalg.norm(np.cross(q[:, 1:] - p[:, 1:], s[:, 1:] - p[:, 1:]), axis=1)

    s1 = area(p02, p03, p13)
    s2 = area(p02, p13, p12)
    tot = s1 + s2
    safe = np.where(tot > 0, tot, 1.0)
    quad = (
        s1[:, None] * (p02 + p03 + p13) / 3 + s2[:, None] * (p02 + p13 + p12) / 3
    ) / safe[:, None]
    quad = np.where((tot > 0)[:, None], quad, (p02 + p03 + p13 + p12) / 4)
    frac[rb] = quad[rb]
    return frac


def tetra_dos_reference(mesh, tets, ir_map, eig, energies, proj):
    """Plain-numpy reference of :func:`tetra_dos_numba` (memory ∝ full mesh)."""
    a, rows, band = _sorted_tetra(mesh, tets, ir_map, np.asarray(eig))
    nfull = int(np.prod(mesh))
    total = np.zeros(energies.size)
    channels = None if proj is None else np.zeros((proj.shape[2], energies.size))
    for j, en in enumerate(energies):
        dt = _ref_dos_t(a, en)
        total[j] = dt.sum()
        if proj is not None:
            dw = dt[:, None] * _ref_corner_fractions(a, en)  # (nt·nb, 4)
            pc = proj[rows, band[:, None], :]  # (nt·nb, 4, nch)
            channels[:, j] = np.einsum("tr,trc->c", dw, pc)
    norm = 1.0 / (6.0 * nfull)
    return total * norm, (None if channels is None else channels * norm)


def _ref_count_t(a, en):
    """Closed-form linear count N_T(E) of many tetrahedra (numpy)."""
    a0, a1, a2, a3 = a.T
    out = np.where(en >= a3, 1.0, 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        na = (en - a0) ** 3 / ((a1 - a0) * (a2 - a0) * (a3 - a0))
        e21, e31, e41 = a1 - a0, a2 - a0, a3 - a0
        e32, e42 = a2 - a1, a3 - a1
        x = en - a1
        nb_ = (e21**2 + 3 * e21 * x + 3 * x**2 - (e31 + e42) / (e32 * e42) * x**3) / (e31 * e41)
        nc = 1.0 - (a3 - en) ** 3 / ((a3 - a0) * (a3 - a1) * (a3 - a2))
    ra = (en > a0) & (en <= a1)
    rb = (en > a1) & (en <= a2)
    rc = (en > a2) & (en < a3)
    out[ra] = na[ra]
    out[rb] = nb_[rb]
    out[rc] = nc[rc]
    return out


def tetra_count_reference(mesh, tets, ir_map, eig, energy):
    """Closed-form linear count Σ_T N_T(E) / (6·nfull) (Blöchl et al. 1994, Appendix B)."""
    a, _, _ = _sorted_tetra(mesh, tets, ir_map, np.asarray(eig, dtype=np.float64))
    return float(_ref_count_t(a, energy).sum()) / (6.0 * int(np.prod(mesh)))


def tetra_integrate_reference(mesh, tets, ir_map, eig, values, energy, bloechl):
    """Plain-numpy reference of :func:`tetra_integrate_numba`, by an independent route.

    The linear weights are w_r(E) = ∫_{a0}^{E} d_r(ε) dε with the geometric delta weights
    d_r = D_T · (mean barycentric coordinate of the cross-section); d_r is a polynomial of
    degree ≤ 3 between consecutive corner energies, so 2-point Gauss–Legendre quadrature on
    each sub-interval is exact. Blöchl's correction is added from the closed-form D_T(E).
    """
    eig = np.asarray(eig, dtype=np.float64)
    values = np.asarray(values, dtype=np.float64)
    a, rows, band = _sorted_tetra(mesh, tets, ir_map, eig)
    nfull = int(np.prod(mesh))
    fvals = values[rows, band[:, None]]  # (nt·nb, 4)
    w = np.zeros_like(a)
    for k in range(3):
        lo = a[:, k]
        hi = np.minimum(a[:, k + 1], energy)
        span = np.clip(hi - lo, 0.0, None)
        mid = lo + 0.5 * span
        for g in (-1.0 / math.sqrt(3.0), 1.0 / math.sqrt(3.0)):
            en = mid + 0.5 * span * g
            w += (0.5 * span * _ref_dos_t(a, en))[:, None] * _ref_corner_fractions(a, en)
    total = float((w * fvals).sum())
    if bloechl:
        dt = _ref_dos_t(a, energy)
        corr = dt[:, None] / 40.0 * (a.sum(axis=1)[:, None] - 4.0 * a)
        total += float((corr * fvals).sum())
    return total / (6.0 * nfull)
