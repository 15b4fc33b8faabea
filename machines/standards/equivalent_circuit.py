"""The double-cage equivalent circuit of an induction motor, and its fit to a data sheet.

The circuit, per phase, in per unit of the motor's own base (rated voltage V_n, rated input current = the full-load
current I_n, so the base power is the rated input apparent power √3·V_n·I_n and the base torque that power over the
synchronous speed):

    V ── R1 + jX1 ──┬── jXc ──┬── R2/s + jX2   (outer, starting cage: high resistance, low leakage)
                    │         │
                   jXm        └── R3/s + jX3   (inner, running cage: low resistance, high leakage)

a stator branch R1 + jX1, the magnetising reactance jXm, an optional common rotor leakage jXc and the two rotor
cages in parallel, each R_k/s + jX_k at slip s. The air-gap power is the power the rotor branches take,
P_ag = |I_r|²·Re(Z2 ∥ Z3), and the electromagnetic torque in pu of the base torque equals it (T = P_ag/ω_s). This is
the double-cage circuit of the textbooks: A. E. Fitzgerald, C. Kingsley, S. D. Umans, *Electric Machinery*,
induction-machine chapter (equivalent circuit, torque from the Thevenin equivalent, deep-bar and double-cage
rotors), and M. G. Say, *Alternating Current Machines*, double-cage induction motor — chapters quoted from memory.

Fitted to what a data sheet gives (:func:`fit_double_cage`), after the approach of J. Pedra, "On the
determination of induction motor parameters from manufacturer data for electromechanical transient programs",
IEEE Trans. Power Systems 23(4), 2008 (from memory): the parameters solve, in the least-squares sense, the
equations of the rated point (slip s_r, current 1∠−φ, air-gap torque η·cos φ/(1 − s_r)), the locked-rotor current
and torque, and the breakdown torque (the curve's maximum), by damped Gauss–Newton (Levenberg–Marquardt) on the
logarithms of the parameters (so they stay positive); two weak conditions fix what the data leave free (the stator
and outer-cage leakages alike, a small common leakage). An optional pull-up torque (the least torque from
standstill to breakdown speed) is a further equation. Torques are returned in pu of rated torque and currents in
pu of full-load current.

Methods: machines/METHODS.md §3.6.
"""

from __future__ import annotations

import itertools
import math
from functools import lru_cache

import numpy as np

from machines.frozen import frozen

#: slips of the fit's grid from rated slip to standstill, log-spaced [-]
FIT_GRID_POINTS = 96
#: largest relative residual of the data-sheet equations for a fit to count as converged [-]
CONVERGED = 0.02
#: largest relative residual with which the circuit still stands for the motor (the departure then reported): a
#: constant-parameter circuit has no leakage saturation, so a data sheet's locked-rotor current with its breakdown
#: torque can lie a few per cent beyond it; 5 % is well inside the tolerances IEC 60034-1 allows the maker on
#: locked-rotor current (+20 %), locked-rotor torque (−15 %) and breakdown torque (−10 %) [-]
ACCEPTED = 0.05
#: weight of the weak conditions that fix what the data sheet leaves free [-]
WEAK_WEIGHT = 0.05
#: the common rotor leakage the weak condition draws Xc towards [pu]
COMMON_LEAKAGE = 0.02
#: the search stops at a start whose largest residual is below this (the equations solved) [-]
SOLVED = 1e-4
#: two starts whose costs (sums of squared residuals) agree within this share end at the same optimum [-]
AGREE = 0.01
#: the starts from the data sheet, all tried unless one solves the equations; after them a converged fit, or two
#: starts that agree, end the search [-]
ANALYTIC_STARTS = 4
#: a Levenberg–Marquardt run stops when an iteration lowers its cost by less than this share [-]
STALLED = 1e-9
#: iterations of one Levenberg–Marquardt run, at most [-]
MAX_ITERATIONS = 40
#: parameters are kept within these bounds [pu]
BOUNDS = (1e-5, 1e3)
#: names of the fitted equations, in the order of the residual vector
EQUATIONS = ("rated_active_current", "rated_reactive_current", "rated_torque", "locked_rotor_current",
             "locked_rotor_torque", "breakdown_torque", "pull_up_torque")


# ---------------------------------------------------------------------------------------------------- equations


def cage_impedance(slip, resistance, reactance):
    """Impedance of a rotor cage referred to the stator, Z_k = R_k/s + jX_k [pu].

    Parameters
    ----------
    slip : s [pu of synchronous speed], > 0
    resistance : R_k [pu]; reactance : X_k [pu]

    References
    ----------
    Fitzgerald et al., *Electric Machinery*, induction machine equivalent circuit (from memory).

    Examples
    --------
    >>> complex(cage_impedance(0.5, 0.1, 0.2))
    (0.2+0.2j)
    """
    return resistance / np.asarray(slip, dtype=float) + 1j * reactance


def parallel(*impedances):
    """Impedances in parallel, Z = 1 / Σ (1/Z_k) [pu].

    Examples
    --------
    >>> parallel(2.0, 2.0)
    1.0
    """
    return 1.0 / sum(1.0 / z for z in impedances)


def rotor_impedance(slip, r2, x2, r3, x3, xc=0.0):
    """Impedance of the double-cage rotor, Z_r = jXc + (R2/s + jX2) ∥ (R3/s + jX3) [pu].

    Examples
    --------
    >>> z = rotor_impedance(1.0, 0.2, 0.0, 0.2, 0.0, 0.1)   # two equal resistive cages and Xc
    >>> round(float(z.real), 6), round(float(z.imag), 6)
    (0.1, 0.1)
    """
    return 1j * xc + parallel(cage_impedance(slip, r2, x2), cage_impedance(slip, r3, x3))


def input_impedance(slip, r1, x1, xm, r2, x2, r3, x3, xc=0.0):
    """Impedance the motor presents at its terminals, Z = R1 + jX1 + jXm ∥ Z_r [pu].

    Examples
    --------
    >>> z = input_impedance(1.0, 0.1, 0.1, 1.0, 2.0, 0.0, 2.0, 0.0)   # Z_r = 2 ∥ 2 = 1; j1 ∥ 1 = 0.5 + 0.5j
    >>> round(float(z.real), 6), round(float(z.imag), 6)
    (0.6, 0.6)
    """
    return r1 + 1j * x1 + parallel(1j * xm, rotor_impedance(slip, r2, x2, r3, x3, xc))


def stator_current(slip, r1, x1, xm, r2, x2, r3, x3, xc=0.0, voltage=1.0):
    """Stator current phasor, I1 = V / Z [pu of rated current] (V [pu], the reference phasor).

    Examples
    --------
    >>> i = stator_current(1.0, 0.1, 0.1, 1.0, 2.0, 0.0, 2.0, 0.0)   # 1 / (0.6 + 0.6j)
    >>> round(float(i.real), 6), round(float(i.imag), 6)
    (0.833333, -0.833333)
    """
    return voltage / input_impedance(slip, r1, x1, xm, r2, x2, r3, x3, xc)


def rotor_current(slip, r1, x1, xm, r2, x2, r3, x3, xc=0.0, voltage=1.0):
    """Current into the rotor branches, I_r = I1 · jXm / (jXm + Z_r) (current divider) [pu].

    Examples
    --------
    >>> i = rotor_current(1.0, 0.1, 0.1, 1.0, 2.0, 0.0, 2.0, 0.0)   # (0.833 − 0.833j) · j/(1 + j)
    >>> round(float(i.real), 6), round(float(i.imag), 6)
    (0.833333, 0.0)
    """
    zr = rotor_impedance(slip, r2, x2, r3, x3, xc)
    return stator_current(slip, r1, x1, xm, r2, x2, r3, x3, xc, voltage) * (1j * xm) / (1j * xm + zr)


def airgap_torque(slip, r1, x1, xm, r2, x2, r3, x3, xc=0.0, voltage=1.0):
    """Electromagnetic torque = air-gap power, T = |I_r|²·Re(Z2 ∥ Z3) = Σ |I_k|²·R_k/s [pu of the base torque
    √3·V_n·I_n/ω_s].

    Notes
    -----
    The air-gap power is the power the rotor branches take; jXc takes none. The torque is P_ag / ω_s, so in pu of
    the base torque it equals the air-gap power in pu of the base power.

    Examples
    --------
    >>> round(float(airgap_torque(1.0, 0.1, 0.1, 1.0, 2.0, 0.0, 2.0, 0.0)), 6)   # 0.833² · 1 = P_in − |I1|²·R1
    0.694444
    """
    ir = rotor_current(slip, r1, x1, xm, r2, x2, r3, x3, xc, voltage)
    zp = parallel(cage_impedance(slip, r2, x2), cage_impedance(slip, r3, x3))
    return np.abs(ir) ** 2 * np.real(zp)


def rated_airgap_torque(efficiency: float, power_factor: float, rated_slip: float) -> float:
    """Rated torque in pu of the base torque, T_n = η·cos φ / (1 − s_r) [pu].

    Notes
    -----
    Shaft power η·cos φ (pu of the rated input apparent power) at rated speed (1 − s_r) pu; the friction, windage
    and core losses are lumped into the stator resistance by the fit (the stator's loss balance then gives R1), so
    the air-gap torque at rated slip is taken equal to the rated shaft torque.

    Examples
    --------
    >>> round(rated_airgap_torque(0.958, 0.89, 12 / 1800), 5)
    0.85834
    """
    return efficiency * power_factor / (1.0 - rated_slip)


# ---------------------------------------------------------------------------------------------------- the fit


@frozen
class DoubleCage:
    """A fitted double-cage circuit [pu of the motor's base] and how well it honours its data sheet.

    ``rated_torque`` is T_n in pu of the base torque (:func:`rated_airgap_torque`); ``residuals`` the relative
    residual of each data-sheet equation (:data:`EQUATIONS`), ``worst`` the largest of the data sheet's (the
    pull-up target excluded); ``pull_up`` the least torque of the fitted curve from standstill to breakdown speed
    [pu of rated torque] and ``target`` the pull-up torque it was fitted to (None: no target).
    """

    r1: float
    x1: float
    xm: float
    r2: float
    x2: float
    r3: float
    x3: float
    xc: float
    rated_torque: float
    residuals: tuple[float, ...]
    worst: float
    worst_equation: str
    pull_up: float
    breakdown_slip: float
    target: float | None

    @property
    def parameters(self) -> tuple[float, ...]:
        return self.r1, self.x1, self.xm, self.r2, self.x2, self.r3, self.x3, self.xc

    @property
    def converged(self) -> bool:
        """Every data-sheet equation within :data:`CONVERGED`."""
        return self.worst <= CONVERGED

    @property
    def usable(self) -> bool:
        """Every data-sheet equation within :data:`ACCEPTED`: the circuit stands for the motor."""
        return self.worst <= ACCEPTED

    def torque(self, slip) -> np.ndarray:
        """Torque at rated voltage [pu of rated torque] (0 at s = 0)."""
        s = np.maximum(np.asarray(slip, dtype=float), 1e-12)
        return airgap_torque(s, *self.parameters) / self.rated_torque

    def current(self, slip) -> np.ndarray:
        """Stator current magnitude at rated voltage [pu of full-load current]."""
        s = np.maximum(np.asarray(slip, dtype=float), 1e-12)
        return np.abs(stator_current(s, *self.parameters))


def _fit_grid(rated_slip: float) -> np.ndarray:
    """The slips the fit evaluates: rated slip, a log-spaced grid above it to standstill (1 included)."""
    return np.concatenate(([rated_slip], np.geomspace(rated_slip * 1.02, 1.0, FIT_GRID_POINTS)))


def _extremum(t: np.ndarray, j: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(value, offset in grid steps) of the extremum of each row of ``t`` at column ``j``, refined by the vertex of
    the parabola through it and its neighbours; an extremum on the edge of the grid is not refined."""
    rows = np.arange(t.shape[0])
    jj = np.clip(j, 1, t.shape[1] - 2)
    y0, y1, y2 = t[rows, jj - 1], t[rows, jj], t[rows, jj + 1]
    den = y0 - 2.0 * y1 + y2
    safe = (j == jj) & (np.abs(den) > 1e-300)
    d = np.clip(0.5 * (y0 - y2) / np.where(safe, den, 1.0), -1.0, 1.0) * safe
    return np.where(j == jj, y1 - 0.25 * (y0 - y2) * d, t[rows, j]), d


def _curve_points(p: np.ndarray, grid: np.ndarray, t_n: float) -> tuple[np.ndarray, ...]:
    """For parameter rows ``p`` (k × 8): the stator current at rated slip and at standstill, the torques on the
    grid [pu of rated torque], the breakdown torque, the pull-up torque (the least torque from breakdown slip to
    standstill) and the breakdown slip. The equations of :func:`airgap_torque`, each branch computed once."""
    r1, x1, xm, r2, x2, r3, x3, xc = (p[:, i:i + 1] for i in range(8))
    cages = parallel(cage_impedance(grid, r2, x2), cage_impedance(grid, r3, x3))
    zr = 1j * xc + cages
    i1 = 1.0 / (r1 + 1j * x1 + parallel(1j * xm, zr))
    ir = i1 * (1j * xm) / (1j * xm + zr)
    t = np.abs(ir) ** 2 * cages.real / t_n
    body = t[:, 1:]
    k = np.argmax(body, axis=1)
    t_b, d = _extremum(body, k)
    lx = np.log(grid[1:])
    s_b = np.exp(lx[k] + d * (lx[1] - lx[0]))
    tail = np.where(np.arange(body.shape[1]) >= k[:, None], body, np.inf)
    m = np.argmin(tail, axis=1)
    t_pu, _ = _extremum(body, m)
    t_pu = np.where(m > k, np.minimum(t_pu, body[np.arange(body.shape[0]), m]), t_b)
    return i1[:, 0], i1[:, -1], t, t_b, t_pu, s_b


def _residuals(lp: np.ndarray, data: tuple[float, ...], target: float | None, grid: np.ndarray) -> np.ndarray:
    """Residual rows for parameter rows ``lp`` (natural logarithms, k × 8): the data-sheet equations (relative),
    the pull-up target when given, then the weak conditions."""
    s_r, pf, eta, i_lr, t_lr, t_b = data
    p = np.exp(lp)
    t_n = rated_airgap_torque(eta, pf, s_r)
    i_r, i_1, t, tb, tpu, _ = _curve_points(p, grid, t_n)
    cols = [i_r.real - pf, -i_r.imag - math.sqrt(1.0 - pf * pf), t[:, 0] - 1.0, np.abs(i_1) / i_lr - 1.0,
            t[:, -1] / t_lr - 1.0, tb / t_b - 1.0]
    if target is not None:
        cols.append(tpu / max(target, 1e-3) - 1.0)
    cols.append(WEAK_WEIGHT * (lp[:, 1] - lp[:, 4]))  # X1 = X2: the leakage split the data sheet cannot see
    if target is None:
        cols.append(WEAK_WEIGHT * (lp[:, 7] - math.log(COMMON_LEAKAGE)))  # a small common leakage
    return np.stack(cols, axis=1)


#: damping factors tried at once in each iteration, as multiples of the current one [-]
_DAMPING_TRIALS = np.array([1.0 / 3.0, 1.0, 4.0, 32.0, 1024.0])


def _levenberg_marquardt(starts: list[np.ndarray], fun) -> list[tuple[np.ndarray, np.ndarray]]:
    """Damped Gauss–Newton on ``fun`` (rows of parameters → rows of residuals) from each of ``starts``: a
    forward-difference Jacobian, then the steps of several damping factors, the best kept; steps limited to ±1 in
    each log-parameter; at most :data:`MAX_ITERATIONS`. Returns (parameters, residuals) per start.

    The runs are independent; they go in step so that each iteration evaluates ``fun`` once for the Jacobians of
    every run still going and once for all their trial steps (``fun`` treats rows independently)."""
    lo, hi = math.log(BOUNDS[0]), math.log(BOUNDS[1])
    h = 1e-6
    n = starts[0].size if starts else 0
    eye = np.eye(n) * h
    lps = list(starts)
    lams = [1e-3] * len(lps)
    rows = _split(fun(np.vstack([np.vstack((lp, lp + eye)) for lp in lps])), n + 1) if lps else []
    going = list(range(len(lps)))
    for _ in range(MAX_ITERATIONS):
        tries = []  # (run, its cost, its trial steps)
        for i in going:
            f = rows[i][0]
            cost = f @ f
            if not cost > 1e-18:
                continue
            jac = ((rows[i][1:] - f) / h).T
            a, g = jac.T @ jac, jac.T @ f
            tries.append((i, cost, np.clip(lps[i] + np.clip(_damped_steps(a, g, lams[i]), -1.0, 1.0), lo, hi)))
        if not tries:
            break
        results = _split(fun(np.vstack([t for *_, t in tries])), len(_DAMPING_TRIALS))
        going, moved = [], []
        for (i, cost, trials), ft in zip(tries, results):
            costs = np.where(np.all(np.isfinite(ft), axis=1), np.einsum("ij,ij->i", ft, ft), np.inf)
            j = int(np.argmin(costs))
            if not costs[j] < cost:
                lams[i] *= 1e4
                if not lams[i] > 1e8:
                    going.append(i)
                continue
            lams[i] = max(lams[i] * _DAMPING_TRIALS[j], 1e-9)
            lps[i] = trials[j]
            moved.append((i, cost - costs[j] < STALLED * cost))
        if moved:
            fresh = _split(fun(np.vstack([np.vstack((lps[i], lps[i] + eye)) for i, _ in moved])), n + 1)
            for (i, stalled), r in zip(moved, fresh):
                rows[i] = r
                if not stalled:
                    going.append(i)
        going.sort()
    return [(lp, r[0]) for lp, r in zip(lps, rows)]


def _damped_steps(a: np.ndarray, g: np.ndarray, lam: float) -> np.ndarray:
    """The Levenberg–Marquardt steps −(A + k·diag A)⁻¹·g for each damping factor k of ``lam`` × the trials (a row
    each; a zero step where the damped matrix is singular)."""
    scale = np.diag(np.diag(a) + 1e-12)
    damped = a + (lam * _DAMPING_TRIALS)[:, None, None] * scale
    try:
        return -np.linalg.solve(damped, g[None, :, None])[..., 0]
    except np.linalg.LinAlgError:  # one of them singular: each on its own
        steps = np.zeros((len(_DAMPING_TRIALS), g.size))
        for row, m in enumerate(damped):
            try:
                steps[row] = -np.linalg.solve(m, g)
            except np.linalg.LinAlgError:
                pass
        return steps


def _split(rows: np.ndarray, size: int) -> list[np.ndarray]:
    """``rows`` cut into consecutive blocks of ``size`` rows."""
    return [rows[k:k + size] for k in range(0, rows.shape[0], size)]


def _initial_guesses(data: tuple[float, ...]) -> list[np.ndarray]:
    """Starting points: four from the data sheet by the approximate circuit (below), the stator taking 45 %, 30 %
    and 15 % of the leakage, then fixed variations of the outer cage and the running cage's leakage.

    The stator resistance from the loss balance at rated point (R1 = cos φ − T_n, the stator taking all losses
    but the rotor's), the magnetising reactance from the reactive current, the running cage from the rated slip
    (R3 ≈ s_r·T_n/cos²φ), the total leakage from the breakdown torque (T_b·T_n ≈ 1/(2·(R1 + √(R1² + X²)))), the
    outer cage from the locked-rotor impedance 1/I_LR and its resistive part T_LR·T_n/I_LR².
    """
    s_r, pf, eta, i_lr, t_lr, t_b = data
    t_n = rated_airgap_torque(eta, pf, s_r)
    sin_phi = max(math.sqrt(max(1.0 - pf * pf, 0.0)), 0.05)
    r1 = max(pf - t_n, 0.002)
    xm = 1.0 / (0.65 * sin_phi)
    r3 = s_r * t_n / (pf * pf)
    a = 1.0 / (2.0 * t_b * t_n) - r1
    x_tot = math.sqrt(max(a * a - r1 * r1, 0.0)) if a > r1 else 0.1
    x_tot = min(max(x_tot, 0.05), 0.6)
    r_lr = t_lr * t_n / (i_lr * i_lr)
    z_lr = 1.0 / i_lr
    x_lr = math.sqrt(max(z_lr * z_lr - (r1 + r_lr) ** 2, (0.3 * z_lr) ** 2))
    r3 = max(r3, 1e-4)
    out = []
    for share, xc in ((0.45, COMMON_LEAKAGE), (0.3, COMMON_LEAKAGE), (0.45, 0.1 * x_tot), (0.15, COMMON_LEAKAGE)):
        x1 = share * x_tot
        x3 = max(x_tot - x1 - xc, 0.02)
        zp = complex(r_lr, max(x_lr - x1 - xc, 0.2 * x_lr))
        y2 = 1.0 / zp - 1.0 / complex(r3, x3)
        z2 = 1.0 / y2 if y2 != 0 else complex(-1.0, -1.0)
        r2, x2 = (z2.real, z2.imag) if z2.real > 0 and z2.imag > 0 else (2.0 * r_lr, 0.5 * x1)
        out.append(np.log([r1, x1, xm, r2, x2, r3, x3, xc]))
    return out + [np.log([r1, 0.07, xm, r2, x2, r3, x3, COMMON_LEAKAGE]) for r2, x2, x3 in FIXED_STARTS]


#: further starting points (R2, X2, X3) [pu]: outer cages of moderate and high resistance, two leakages each
FIXED_STARTS = tuple(itertools.product((0.15, 0.4), (0.03, 0.08), (0.1, 0.25)))
#: the starting points for a pull-up target besides the fit without it: high-resistance outer cages (a deep dip)
DIP_STARTS = ((0.15, 0.03, 0.1), (0.4, 0.08, 0.25))


@lru_cache(maxsize=256)
def fit_double_cage(rated_slip: float, power_factor: float, efficiency: float, locked_rotor_current: float,
                    locked_rotor_torque: float, breakdown_torque: float,
                    pull_up_torque: float | None = None) -> DoubleCage:
    """The double-cage circuit fitted to a data sheet (module notes; METHODS.md §3.6).

    Parameters
    ----------
    rated_slip : s_r [pu]; power_factor : cos φ at rated load [-]; efficiency : η at rated load [-]
    locked_rotor_current : I_LR [pu of full-load current]
    locked_rotor_torque, breakdown_torque : T_LR, T_b [pu of rated torque]
    pull_up_torque : the least torque from standstill to breakdown speed to fit to [pu], None for none

    Notes
    -----
    Equations, as residuals relative to the datum (the rated current, 1 pu, for its two components):
    Re I1(s_r) = cos φ, −Im I1(s_r) = sin φ, T(s_r) = T_n, |I1(1)| = I_LR, T(1) = T_LR·T_n, max T = T_b·T_n (the
    breakdown torque: the maximum over slips above s_r) and, with a target, min T from breakdown slip to standstill
    = T_pu·T_n; T_n = η·cos φ/(1 − s_r) (:func:`rated_airgap_torque`). Weak conditions fix what the data sheet
    cannot see: X1 = X2 (the leakage split) and, without a target, Xc = 0.02 pu. Levenberg–Marquardt on ln R1 …
    ln Xc from several starting points (:func:`_initial_guesses`), the best kept; the search stops at a start that
    solves the equations (:data:`SOLVED`); after the starts from the data sheet, at a converged fit or when two
    starts end at the same least-squares optimum (:data:`AGREE`). With a target it starts from
    the fit without it and from two outer cages of high resistance. Curves are read on a log-spaced grid of slips
    (:data:`FIT_GRID_POINTS`), the maximum and minimum refined by a parabola.

    A constant-parameter circuit cannot hold every data sheet (it has no leakage saturation): the fit is then the
    least-squares compromise and :attr:`DoubleCage.worst` reports its largest departure (``converged`` within 2 %,
    ``usable`` within :data:`ACCEPTED`). A deep pull-up target cannot be met while every other equation holds
    either: the fit then gives up a few per cent of the data sheet, mostly of T_LR.

    References
    ----------
    J. Pedra, IEEE Trans. Power Systems 23(4), 2008 (from memory); METHODS.md §3.6.

    Examples
    --------
    >>> c = fit_double_cage(12 / 1800, 0.89, 0.958, 6.2, 0.8, 2.2)
    >>> c.converged, round(float(c.torque(1.0)), 3), round(float(c.current(1.0)), 3)
    (True, 0.8, 6.2)
    """
    data = (rated_slip, power_factor, efficiency, locked_rotor_current, locked_rotor_torque, breakdown_torque)
    grid = _fit_grid(rated_slip)
    n_eq = 6 + (pull_up_torque is not None)

    def fun(lp):
        return _residuals(lp, data, pull_up_torque, grid)

    if pull_up_torque is None:
        starts = _initial_guesses(data)
    else:
        free = fit_double_cage(*data)
        guess = _initial_guesses(data)[0]
        starts = [np.log(free.parameters)] + [np.concatenate((guess[:3], np.log([r2, x2]), guess[5:6], [math.log(x3)],
                                                              guess[7:])) for r2, x2, x3 in DIP_STARTS]
    starts = [lp0 for lp0, f0 in zip(starts, fun(np.vstack(starts))) if np.all(np.isfinite(f0))]
    best, best_cost, tried, done = None, math.inf, 0, False
    # the starts run four at a time (one evaluation of the equations serves all four) and are judged one by one, in
    # order, as if they had run in turn
    for k in range(0, len(starts), ANALYTIC_STARTS):
        for lp, f in _levenberg_marquardt(starts[k:k + ANALYTIC_STARTS], fun):
            core = f[:n_eq]
            cost = float(core @ core)
            again = best is not None and abs(cost - best_cost) <= AGREE * best_cost  # the same optimum
            if cost < best_cost:
                best, best_cost = (lp, core), cost
            tried += 1
            worst = np.abs(best[1]).max()
            done = worst < SOLVED or (tried >= ANALYTIC_STARTS and (again or worst <= CONVERGED))
            if done:
                break
        if done:
            break
    lp, core = best
    p = np.exp(lp)
    t_n = rated_airgap_torque(efficiency, power_factor, rated_slip)
    *_, t_pu, s_b = _curve_points(p[None, :], grid, t_n)
    worst = int(np.argmax(np.abs(core[:6])))
    return DoubleCage(*(float(x) for x in p), t_n, tuple(float(x) for x in core), float(abs(core[worst])),
                      EQUATIONS[worst], float(t_pu[0]), float(s_b[0]), pull_up_torque)


__all__ = ["DoubleCage", "airgap_torque", "cage_impedance", "fit_double_cage", "input_impedance", "parallel",
           "rated_airgap_torque", "rotor_current", "rotor_impedance", "stator_current", "EQUATIONS", "CONVERGED",
           "ACCEPTED"]
