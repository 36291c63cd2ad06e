"""Axial force and bending of reinforced-concrete sections by strain compatibility.

Section mechanics only: the stress block and material constants are passed in, so a standard
(or a test reproducing another edition) supplies them. Vectorised over rows: every argument is
an array with one entry (or one row of bars) per case. N and mm; compression positive.

A rectangular section of depth D (in the bending plane) and width b, bars at depths d from the
compressive face with areas A (rows x bars, zero area for padding). Concrete: a rectangular
block of intensity alpha2 f'c over gamma dn (at most D). Steel: elastic-plastic. Bars inside the
block displace concrete when `deduct` is true. Moments are about mid-depth.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np


@dataclass(frozen=True)
class Rect:
    """Rows of rectangular sections with bars; all arrays, bars shaped rows x n."""

    D: np.ndarray
    b: np.ndarray
    fc: np.ndarray
    fsy: np.ndarray
    d: np.ndarray  # bar depths from the compressive face
    A: np.ndarray  # bar areas
    alpha2: np.ndarray
    gamma: np.ndarray
    eps_cu: float = 0.003
    Es: float = 200_000.0
    deduct: bool = True

    def flipped(self) -> Rect:
        """The same sections bent the other way (compressive face swapped)."""
        return Rect(
            self.D,
            self.b,
            self.fc,
            self.fsy,
            self.D[:, None] - self.d,
            self.A,
            self.alpha2,
            self.gamma,
            self.eps_cu,
            self.Es,
            self.deduct,
        )

    @property
    def As(self) -> np.ndarray:
        return row_sums(self.A)

    @property
    def d0(self) -> np.ndarray:
        """Depth of the extreme tension bar."""
        return np.where(self.A > 0, self.d, -np.inf).max(axis=1)

    def take(self, rows: np.ndarray) -> Rect:
        return _take(self, rows)


@dataclass(frozen=True)
class EvenRect:
    """Rows of rectangular sections whose field bars are evenly spaced, all of one area:
    `count` bar positions from depth `edge`, `step` apart (count may be 0), plus optional
    discrete bars (`zd` depths and `zA` areas, rows x k, zero area for padding: the end-zone
    bars of a pier). The field sums have closed forms (arithmetic series), so a section costs
    the same whatever its number of field bars; `bars()` gives the same sections as a `Rect`
    (the tests hold the two equal)."""

    D: np.ndarray
    b: np.ndarray
    fc: np.ndarray
    fsy: np.ndarray
    edge: np.ndarray  # depth of the first field bar position from the compressive face
    step: np.ndarray  # spacing of field bar positions
    count: np.ndarray  # field bar positions per section (>= 0)
    bar_area: np.ndarray  # steel area at one field position (all layers)
    alpha2: np.ndarray
    gamma: np.ndarray
    eps_cu: float = 0.003
    Es: float = 200_000.0
    deduct: bool = True
    zd: np.ndarray | None = None  # discrete bars: depths (rows x k)
    zA: np.ndarray | None = None  # and areas

    def flipped(self) -> EvenRect:
        """The same sections bent the other way (compressive face swapped)."""
        last = self.edge + np.maximum(self.count - 1, 0) * self.step
        zd = None if self.zd is None else np.where(self.zA > 0, self.D[:, None] - self.zd, 0.0)
        return replace(self, edge=self.D - last, zd=zd)

    @property
    def As(self) -> np.ndarray:
        zone = 0.0 if self.zA is None else row_sums(self.zA)
        return self.count * self.bar_area + zone

    @property
    def d0(self) -> np.ndarray:
        field = np.where(self.count > 0, self.edge + (self.count - 1) * self.step, -np.inf)
        if self.zd is None or self.zd.shape[1] == 0:
            return field
        return np.maximum(field, np.where(self.zA > 0, self.zd, -np.inf).max(axis=1))

    def take(self, rows: np.ndarray) -> EvenRect:
        return _take(self, rows)

    def bars(self) -> Rect:
        j = np.arange(int(self.count.max(initial=0)))[None, :]
        inside = j < self.count[:, None]
        d = np.where(inside, self.edge[:, None] + j * self.step[:, None], 0.0)
        A = np.where(inside, self.bar_area[:, None], 0.0)
        if self.zd is not None:
            d, A = np.hstack([d, self.zd]), np.hstack([A, self.zA])
        return Rect(
            self.D,
            self.b,
            self.fc,
            self.fsy,
            d,
            A,
            self.alpha2,
            self.gamma,
            self.eps_cu,
            self.Es,
            self.deduct,
        )


def concat(a, b):
    """Two sets of sections of one kind as one (rows of `a`, then rows of `b`)."""
    out = {}
    for f in fields(a):
        x, y = getattr(a, f.name), getattr(b, f.name)
        out[f.name] = np.concatenate([x, y]) if isinstance(x, np.ndarray) else x
    return type(a)(**out)


def _take(sec, rows):
    out = type(sec)(
        **{
            f.name: (v[rows] if isinstance(v, np.ndarray) else v)
            for f in fields(sec)
            for v in (getattr(sec, f.name),)
        }
    )
    zmask = sec.__dict__.get(_ZMASK)
    if zmask is not None:  # the rows with zone bars, carried along (the solvers take every step)
        object.__setattr__(out, _ZMASK, zmask[rows])
    return out


_ZMASK = "_zone_rows"  # cached on an EvenRect: which rows carry any zone bar


def _even_sums(sec: EvenRect, j0, j1) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Count, sum of depths and sum of squared depths of bar positions j0 <= j < j1."""
    cnt = j1 - j0
    sj = (j1 * (j1 - 1) - j0 * (j0 - 1)) / 2
    sjj = ((j1 - 1) * j1 * (2 * j1 - 1) - (j0 - 1) * j0 * (2 * j0 - 1)) / 6
    e, s = sec.edge, sec.step
    return cnt, cnt * e + s * sj, cnt * e * e + 2 * e * s * sj + s * s * sjj


_CONSTS = "_even_consts"  # cached on an EvenRect: what `_forces_even` reads per section


def _even_consts(sec: EvenRect) -> dict[str, np.ndarray]:
    """The section's own terms of `_forces_even` (its strain limits' ratios, the last bar
    position's series term, ...), worked out once per section object: the solvers call
    `forces` a dozen times on one. Each is the same expression as before, so the same bits."""
    c = sec.__dict__.get(_CONSTS)
    if c is None:
        ey = sec.fsy / sec.Es
        n = sec.count
        e, s = sec.edge, sec.step
        conc_stress = sec.alpha2 * sec.fc
        c = dict(
            conc_stress=conc_stress,
            ya=1 - ey / sec.eps_cu,
            yb=1 + ey / sec.eps_cu,
            h=sec.D / 2,
            p1n=n * (n - 1),
            e2s=2 * e * s,
            ss=s * s,
            conc_area=conc_stress * sec.bar_area,  # the bars' deduction's own factor
        )
        object.__setattr__(sec, _CONSTS, c)
    return c


# The series terms of j = 0 (`_even_sums` with j0 = 0): j0 (j0 - 1) and (j0 - 1) j0 (2 j0 - 1)
_P1_0 = 0.0 * (0.0 - 1)
_P2_0 = (0.0 - 1) * 0.0 * (2 * 0.0 - 1)


def _upto(x: np.ndarray, e, s, n, inclusive: bool = True) -> np.ndarray:
    """Bar positions with depth <= x (or < x): clip(floor((x - e) / s) + 1 (or ceil), 0, n),
    worked in `x`'s own array (the caller's temporary; the same operations in their order)."""
    np.subtract(x, e, out=x)
    np.divide(x, s, out=x)
    if inclusive:
        np.floor(x, out=x)
        np.add(x, 1, out=x)
    else:
        np.ceil(x, out=x)
    np.maximum(x, 0, out=x)  # np.clip's bounds, each a ufunc (clip's wrapper cost more)
    return np.minimum(x, n, out=x)


def _forces_even(sec: EvenRect, dn: np.ndarray, moment: bool = True) -> tuple[np.ndarray, np.ndarray | None]:
    """`forces` for evenly spaced bars: the bars fall in three strain zones (yielded in
    compression, elastic, yielded in tension), each an arithmetic series of depths.

    The arithmetic of `_even_sums` over the ranges [0, ja), [ja, jb), [jb, n) and [0, jd),
    term for term, with each bound's series terms j (j - 1) and (j - 1) j (2 j - 1) worked out
    once (not once per range it bounds), the sums of squares only where read (the elastic
    range) and the section's own terms once (`_even_consts`): the same numbers to the last
    bit (tests/test_axial_speed2.py holds it against `_even_sums`). Without `moment` N alone
    (M None): what the solve for N = N* reads, in less than half the arithmetic.

    Each expression is worked in place in a few arrays of its own (`out=`), the same
    operations on the same operands in the same order (a product's operands may be swapped:
    IEEE products commute): a dozen fewer arrays made per call, which the solvers make a
    dozen times per row (tests/test_axial_speed4.py holds it against the expressions)."""
    c = _even_consts(sec)
    depth = np.multiply(sec.gamma, dn)
    np.minimum(depth, sec.D, out=depth)
    conc_stress = c["conc_stress"]
    cc = np.multiply(conc_stress, depth)
    cc *= sec.b
    n = sec.count
    e, s = sec.edge, sec.step
    ja = _upto(np.multiply(dn, c["ya"]), e, s, n)  # d <= this: yielded in compression
    jb = _upto(np.multiply(dn, c["yb"]), e, s, n)  # d >= this: yielded in tension
    p1a = np.subtract(ja, 1)
    p1a *= ja  # ja (ja - 1)
    p1b = np.subtract(jb, 1)
    p1b *= jb
    # [0, ja): count ja (ja - 0 is ja to the bit); [ja, jb): count and sum of depths; [jb, n)
    c0 = ja
    e0 = np.subtract(jb, ja)
    sj = np.subtract(p1b, p1a)
    sj /= 2  # (p1b - p1a) / 2
    e0e = np.multiply(e0, e)
    e1 = np.multiply(s, sj)
    e1 += e0e  # e0e + s sj
    t0 = np.subtract(n, jb)
    k = np.divide(sec.Es * sec.eps_cu, dn)
    fy, area = sec.fsy, sec.bar_area
    # ns = area (fy (c0 - t0) + k (dn e0 - e1))
    ns = np.subtract(c0, t0)
    ns *= fy
    w = np.multiply(dn, e0)
    w -= e1
    w *= k
    ns += w
    ns *= area
    ms = None
    if moment:  # the sums of depths of the outer ranges, and of squared depths of the elastic one
        h = c["h"]
        ms = _moment_even(sec, c, dn, ja, jb, p1a, p1b, e0, e0e, sj, e1, t0, k, w)
    if sec.deduct:
        b0 = _upto(depth.copy(), e, s, n, inclusive=False)
        if moment:  # ms - conc_stress area (h b0 - b1), b1 = b0 e + s ((b0 (b0 - 1) - P1_0) / 2)
            b1 = np.subtract(b0, 1)
            b1 *= b0
            b1 -= _P1_0
            b1 /= 2
            b1 *= s
            np.multiply(b0, e, out=w)
            b1 += w
            np.multiply(h, b0, out=w)
            w -= b1
            w *= c["conc_area"]
            ms -= w
        b0 *= c["conc_area"]  # ns - conc_stress area b0
        ns -= b0
    if sec.zd is not None and sec.zd.shape[1]:
        ns, ms = _add_zone_forces(sec, dn, depth, conc_stress, ns, ms)
    if not moment:
        ns += cc  # cc + ns
        return ns, None
    # cc (h - depth / 2) + ms
    depth /= 2
    np.subtract(h, depth, out=depth)
    depth *= cc
    depth += ms
    ns += cc
    return ns, depth


def _moment_even(sec, c, dn, ja, jb, p1a, p1b, e0, e0e, sj, e1, t0, k, w) -> np.ndarray:
    """M of the bars of `_forces_even` (before the deduction of concrete they displace):
    area (fy (h c0 - c1) - fy (h t0 - t1) + k (dn h e0 - (dn + h) e1 + e2)), worked in place
    term by term in the expressions' order; `w` a work array of the rows' length."""
    e, s, h = sec.edge, sec.step, c["h"]
    fy = sec.fsy
    # c1 = c0 e + s ((p1a - P1_0) / 2)
    c1 = np.subtract(p1a, _P1_0)
    c1 /= 2
    c1 *= s
    np.multiply(ja, e, out=w)
    c1 += w
    # sjj = ((jb - 1) jb (2 jb - 1) - (ja - 1) ja (2 ja - 1)) / 6
    sjj = _cube_term(jb, w)
    sjj -= _cube_term(ja, w)
    sjj /= 6
    # e2 = e0e e + e2s sj + ss sjj
    e2 = np.multiply(e0e, e)
    np.multiply(c["e2s"], sj, out=w)
    e2 += w
    sjj *= c["ss"]
    e2 += sjj
    # t1 = t0 e + s ((p1n - p1b) / 2)
    t1 = np.subtract(c["p1n"], p1b)
    t1 /= 2
    t1 *= s
    np.multiply(t0, e, out=w)
    t1 += w
    # m = fy (h c0 - c1) - fy (h t0 - t1) + k (dn h e0 - (dn + h) e1 + e2)
    m = np.multiply(h, ja)
    m -= c1
    m *= fy
    np.multiply(h, t0, out=w)
    w -= t1
    w *= fy
    m -= w
    np.multiply(dn, h, out=w)
    w *= e0  # dn h e0
    np.add(dn, h, out=c1)
    c1 *= e1  # (dn + h) e1
    w -= c1
    w += e2
    w *= k
    m += w
    m *= sec.bar_area
    return m


def _cube_term(j: np.ndarray, w: np.ndarray) -> np.ndarray:
    """(j - 1) j (2 j - 1), a new array (`w` a work array, overwritten)."""
    out = np.subtract(j, 1)
    out *= j
    np.multiply(2, j, out=w)
    w -= 1
    out *= w
    return out


def _add_zone_forces(sec: EvenRect, dn, depth, conc_stress, ns, ms) -> tuple[np.ndarray, np.ndarray | None]:
    """ns, ms plus the forces of the discrete bars, worked out only on the rows that have any
    (the advice search pads every variant to the most zone bars of any: at the M tower 7 rows
    in 10 carry none). A row without bars would add sums of zeros, so the result is the same
    to the last bit; each row's sum runs over the same columns as before. `ms` None: N alone."""
    has = sec.__dict__.get(_ZMASK)
    if has is None:
        has = (sec.zA > 0).any(axis=1)
        object.__setattr__(sec, _ZMASK, has)
    moment = ms is not None
    if has.all():
        zn, zm = _bar_forces(sec, sec.zd, sec.zA, dn, depth, conc_stress, moment=moment)
        return ns + zn, (ms + zm if moment else None)
    rows = np.flatnonzero(has)
    if rows.size == 0:
        return ns + 0.0, (ms + 0.0 if moment else None)
    zn, zm = _bar_forces(
        sec, sec.zd[rows], sec.zA[rows], dn[rows], depth[rows], conc_stress[rows], sec.fsy[rows], sec.D[rows],
        moment=moment,
    )  # fmt: skip
    ns = ns.copy()
    ns[rows] += zn
    if moment:
        ms = ms.copy()
        ms[rows] += zm
    return ns, ms


def _bar_forces(
    sec, d, A, dn, depth, conc_stress, fsy=None, D=None, moment: bool = True
) -> tuple[np.ndarray, np.ndarray | None]:
    """Axial force and moment about mid-depth of bars given one by one (depths d, areas A);
    `fsy` and `D` for rows other than all of `sec`'s; without `moment` the force alone."""
    fsy = sec.fsy if fsy is None else fsy
    D = sec.D if D is None else D
    strain = sec.eps_cu * (dn[:, None] - d) / dn[:, None]
    stress = np.minimum(np.maximum(sec.Es * strain, -fsy[:, None]), fsy[:, None])
    if sec.deduct:
        stress = stress - np.where(d < depth[:, None], conc_stress[:, None], 0.0)
    fs = stress * A
    return row_sums(fs), (row_sums(fs * (D[:, None] / 2 - d)) if moment else None)


def row_sums(a: np.ndarray) -> np.ndarray:
    """Each row's sum, its terms added left to right. Bars are padded with zeros to the widest
    row of a call, and numpy's `sum(axis=1)` adds a row of 8 or more terms in eight running
    sums, so the padding moved a row's last bit: a case's numbers depended on which other rows
    shared its call (changing one wall's end zones moved other walls' utilisations by up to
    2e-15). Added in order, trailing zeros change nothing."""
    if not a.shape[1]:
        return np.zeros(a.shape[0])
    return np.add.accumulate(a, axis=1)[:, -1]


def forces(sec: Rect | EvenRect, dn) -> tuple[np.ndarray, np.ndarray]:
    """Nominal (N, M) for neutral-axis depths dn (one per row)."""
    dn = np.asarray(dn, dtype=float)
    if isinstance(sec, EvenRect):
        return _forces_even(sec, dn)
    depth = np.minimum(sec.gamma * dn, sec.D)
    conc_stress = sec.alpha2 * sec.fc
    cc = conc_stress * depth * sec.b
    ns, ms = _bar_forces(sec, sec.d, sec.A, dn, depth, conc_stress)
    return cc + ns, cc * (sec.D / 2 - depth / 2) + ms


def forces_of(sec: Rect | EvenRect, of: np.ndarray | None, dn: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """`forces(sec.take(of), dn)` worked in blocks of `BLOCK` rows, each taking its sections
    from `sec` (no copy of the sections for every row, and a block's temporaries stay in the
    processor's cache); `of` None: `forces(sec, dn)`. Each row's numbers read its own row
    alone, so the same numbers."""
    if of is None or of.size <= BLOCK:
        return forces(sec if of is None else sec.take(of), dn)
    n, m = np.empty(dn.shape), np.empty(dn.shape)
    for at in range(0, dn.size, BLOCK):
        part = slice(at, at + BLOCK)
        n[part], m[part] = forces(sec.take(of[part]), dn[part])
    return n, m


def axial_force(sec: Rect | EvenRect, dn) -> np.ndarray:
    """N of `forces` alone (the same numbers; evenly spaced bars without the moment's sums)."""
    if isinstance(sec, EvenRect):
        return _forces_even(sec, np.asarray(dn, dtype=float), moment=False)[0]
    return forces(sec, dn)[0]


def solve_dn(
    sec: Rect | EvenRect, target, lo, hi, iterations: int = 60, scale=None, ends=None, of=None
) -> np.ndarray:
    """Neutral-axis depth where g(dn) = target, for g increasing in dn, on all rows at once.
    g is N(dn), or N(dn) x scale(N, dn, rows) when `scale` (e.g. phi, which ACI 318 reads from
    the strain at dn and AS 3600 from N) is given; `rows` says which rows N belongs to (None:
    all). The solver passes one `rows` array until its set of rows shrinks, so a callback may
    keep what it gathers for it (`RowsMemo`). `ends`, where the caller has them, are g at lo
    and at hi (the same numbers: e.g. worked out once per section and spread to its rows).

    Regula falsi with the Illinois modification inside a bracket that always holds the root,
    every third step a plain bisection (so kinks where bars yield cannot stall it); rows stop
    when the bracket is below 1e-12 D or g meets the target to 1e-12 of the force scale
    (`iterations` caps the steps). Where the root is unique the answer is a bisection's to
    round-off, in about a quarter of the steps; where N(dn) dips as a bar enters the stress
    block (bars displace concrete) there may be several roots, and either method may give
    any of them.

    `of`, where given, is each row's section among `sec`'s (one per distinct section): each
    block of rows then takes its sections from `sec` alone, with no copy of the sections for
    every row first (the same numbers, row for row)."""
    D = sec.D if of is None else sec.D[of]
    lo = np.array(np.broadcast_to(np.asarray(lo, dtype=float), D.shape))
    hi = np.array(np.broadcast_to(np.asarray(hi, dtype=float), D.shape))
    target = np.broadcast_to(np.asarray(target, dtype=float), D.shape)
    memo = RowsMemo()
    whole: list = []  # the sections of every row, where `of` is given and no block is smaller

    def g(x: np.ndarray, rows) -> np.ndarray:
        if rows is not None:
            part = memo("sec", rows, lambda: sec.take(rows if of is None else of[rows]))
        elif of is None:
            part = sec
        else:
            if not whole:
                whole.append(sec.take(of))
            part = whole[0]
        n = axial_force(part, x)
        aim = target if rows is None else memo("target", rows, lambda: target[rows])
        return (n * scale(n, x, rows) if scale else n) - aim

    return _illinois(g, lo, hi, np.abs(target), D, iterations, ends)


def solve_ray(
    sec: Rect | EvenRect, n_dir, m_dir, lo, hi, phi_of, iterations: int = 60, ends=None
) -> np.ndarray:
    """Neutral-axis depth where the factored point (phi N, phi |M|)(dn) lies on the ray from the
    origin along (n_dir, m_dir), m_dir >= 0: the root of the cross product
    g(dn) = phi N m_dir - phi |M| n_dir, which rises with dn between pure bending and
    decompression (the point's polar angle falls). `phi_of(N, dn, rows)` gives phi at the
    nominal point (N, dn). `ends`: g at lo and at hi where the caller has them (`ray_ends`).
    Same bracketing solver as `solve_dn`."""
    lo = np.array(np.broadcast_to(np.asarray(lo, dtype=float), sec.D.shape))
    hi = np.array(np.broadcast_to(np.asarray(hi, dtype=float), sec.D.shape))
    n_dir = np.broadcast_to(np.asarray(n_dir, dtype=float), sec.D.shape)
    m_dir = np.broadcast_to(np.asarray(m_dir, dtype=float), sec.D.shape)
    memo = RowsMemo()

    def g(x: np.ndarray, rows) -> np.ndarray:
        if rows is None:
            part, a, b = sec, m_dir, n_dir
        else:
            part = memo("sec", rows, lambda: sec.take(rows))
            a = memo("m_dir", rows, lambda: m_dir[rows])
            b = memo("n_dir", rows, lambda: n_dir[rows])
        n, m = forces(part, x)
        return ray_g(phi_of(n, x, rows), n, m, a, b)

    return _illinois(g, lo, hi, np.zeros(sec.D.shape), sec.D, iterations, ends)


def ray_g(phi, n, m, m_dir, n_dir) -> np.ndarray:
    """`solve_ray`'s function at a nominal point (n, m) with its phi: also for its `ends`."""
    return phi * (n * m_dir - np.abs(m) * n_dir)


class RowsMemo:
    """What a solver's callback gathers for one `rows` array, kept until another comes: the
    solver passes the same array on every step until its set of active rows shrinks (a
    gather of every per-row input on every step cost more than a third of the N-M check)."""

    def __init__(self) -> None:
        self._rows: np.ndarray | None = None
        self._got: dict = {}

    def __call__(self, key, rows: np.ndarray, make):
        if rows is not self._rows:
            self._rows, self._got = rows, {}
        got = self._got.get(key)
        if got is None:
            got = self._got[key] = make()
        return got


REPACK = 8
"""The solver packs its rows again once more than 1 / REPACK of those it holds have finished
(`_illinois`)."""

BLOCK = 32_768
"""The solver works through its rows in blocks of this many (`_illinois`)."""


def _illinois(g, lo, hi, scale_g, D, iterations, ends=None) -> np.ndarray:
    """Root of g (increasing) in [lo, hi] per row; `scale_g` adds to the force scale of the
    tolerance; `ends` = (g(lo), g(hi)) where known. Regula falsi, Illinois modification,
    every third step a bisection.

    The rows are solved in blocks of `BLOCK` rows, one block to its end before the next: a
    block's arrays (256 kB each) stay in the processor's cache over its dozen steps, where
    every step over all the rows streamed them from memory (a quarter of the solver's time at
    the L tower's 250 000 rows). Within a block the rows still iterating are held packed
    (their brackets, g values and last sides), and packed again only once more than
    1 / `REPACK` of those held have finished: g is called with one `rows` array until then
    (None while every row is held), and the rows that finished meanwhile take further steps
    whose answers are not read (each packing gathers every per-row input of g again: a few
    rows finishing per step cost a gather of all of them, more than the steps they skip).
    Each row's steps, up to the one it finishes at, are the same arithmetic on the same
    numbers as when every array was gathered from and scattered back to full length on every
    step, so the same roots to the last bit (tests/test_axial_speed2.py, test_axial_speed3.py)."""
    glo, ghi = (g(lo, None), g(hi, None)) if ends is None else ends
    tol_g = 1e-12 * (np.abs(glo) + np.abs(ghi) + scale_g)
    tol_x = 1e-12 * D
    out = 0.5 * (lo + hi)
    out = np.where(glo >= 0, lo, np.where(ghi <= 0, hi, out))  # target outside: the nearer end
    active = np.flatnonzero((glo < 0) & (ghi > 0) & (hi - lo > tol_x))
    if active.size == D.size and active.size <= BLOCK:
        _solve_block(g, None, lo, hi, glo, ghi, tol_g, tol_x, out, iterations)
        return out
    for start in range(0, active.size, BLOCK):
        rows = active[start : start + BLOCK]
        a, b, ga, gb, tg, tx = (v[rows] for v in (lo, hi, glo, ghi, tol_g, tol_x))
        _solve_block(g, rows, a, b, ga, gb, tg, tx, out, iterations)
    return out


def _solve_block(g, rows, a, b, ga, gb, tg, tx, out, iterations) -> None:
    """`_illinois`'s steps on the rows `rows` (None: every row) whose brackets (a, b), g
    values (ga, gb) and tolerances (tg, tx) are given packed; the roots written into `out`.

    The brackets and their g values are updated in their own arrays (`np.copyto` and
    `np.multiply` with `where=`: the same choice per row as the `np.where` of each, and the
    same halving 0.5 g), not made anew at each step; the caller's arrays are not written (the
    block's own copies are)."""
    held = np.arange(a.size) if rows is None else rows  # the rows held, as rows of `out`
    if rows is None:  # every row's arrays are the caller's: copies to work in
        a, b, ga, gb = a.copy(), b.copy(), ga.copy(), gb.copy()
    below = above = None  # each row's side of its last step (every row packed has taken as many)
    live = None  # which rows held are still iterating (None: all)
    left = a.size
    for it in range(iterations):
        if left == 0:
            break
        mid = np.add(a, b)
        mid *= 0.5  # 0.5 (a + b)
        if it % 3 == 2:
            x = mid
        else:
            with np.errstate(divide="ignore", invalid="ignore"):
                x = np.multiply(a, gb)
                w = np.multiply(b, ga)
                x -= w
                np.subtract(gb, ga, out=w)
                x /= w  # (a gb - b ga) / (gb - ga)
            # inside the bracket (false for NaN and the infinities): not finite, or <= a, or >= b
            inside = np.greater(x, a)
            inside &= np.less(x, b)
            np.copyto(mid, x, where=inside)
            x = mid
        gx = g(x, rows)
        # Illinois: an end kept twice in a row has its g halved, so the next point moves off it
        prev, prev_above = below, above
        below = gx < 0
        above = ~below
        if prev is not None:  # ga: where(below, gx, where(prev, ga, 0.5 ga)); gb likewise
            np.multiply(ga, 0.5, out=ga, where=above & prev_above)
            np.multiply(gb, 0.5, out=gb, where=below & prev)
        np.copyto(ga, gx, where=below)
        np.copyto(gb, gx, where=above)
        np.copyto(a, x, where=below)  # a, b = where(below, x, a), where(below, b, x)
        np.copyto(b, x, where=above)
        w = np.abs(gx)
        done = w <= tg
        np.subtract(b, a, out=w)
        done |= w <= tx  # |g| <= tg or b - a <= tx
        if live is not None:
            done &= live
        if not done.any():
            continue
        out[held[done]] = x[done]
        live = ~done if live is None else live & ~done
        left = int(np.count_nonzero(live))
        if (a.size - left) * REPACK <= a.size:  # few finished: held as they are
            continue
        rows = held = held[live]
        a, b, ga, gb, tg, tx, below, above = (v[live] for v in (a, b, ga, gb, tg, tx, below, above))
        live = None
    if left:
        mid = 0.5 * (a + b)
        out[held if live is None else held[live]] = mid if live is None else mid[live]


def tension_capacity(sec: Rect | EvenRect) -> np.ndarray:
    """All bars yielding in tension, concrete cracked: -As fsy (negative)."""
    return -sec.As * sec.fsy
