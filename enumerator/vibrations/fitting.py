"""Least-squares fits of energy-factored force constants to measured bands.

Given measured wavenumbers of one reporter class on one isomer, find the
constants of the Cotton–Kraihanzel type force field
(:mod:`enumerator.vibrations.forcefield`; F. A. Cotton and C. S. Kraihanzel,
*J. Am. Chem. Soc.* 84 (1962) 4432) that reproduce them.  The GF eigenvalue
problem (Wilson, Decius & Cross, *Molecular Vibrations*, 1955) is solved at
each step; F is linear in the constants, so the Jacobian of the wavenumbers
follows from first-order perturbation theory (Hellmann–Feynman):
∂λ/∂p = yᵀ G^½ (∂F/∂p) G^½ y, and ∂ν̃/∂p = C/(2√λ) ∂λ/∂p.  A damped
Gauss–Newton (Levenberg–Marquardt) iteration minimises the sum of squared
wavenumber residuals.  Uncertainties are the square roots of the diagonal
of s²(JᵀJ)⁻¹ with s² = RSS/(n − p), the residual variance.

A measured band is matched to a predicted band by its species and its rank
within that species ('A1(2)' = the second-highest A1 band), which stays
stable while the constants move.  Without an assignment every one-to-one
matching of the measured bands onto the IR-active bands is fitted and the
best kept (smallest residuals, then the constants nearest the defaults).

The fit refuses, with a message saying what to fix, when there are fewer
bands than free constants or when the assigned bands fix only some
combinations of them (e.g. only T1u of M(CO)6, which fixes k − kt alone).
Constants can be held (``fixed``) or tied by the Cotton–Kraihanzel
approximation kt = 2 kc (``tie_ck``).

>>> from enumerator.rules.ruleset import load_rules
>>> from enumerator.parse.abstract import parse_abstract
>>> from enumerator.workflow.pipeline import apply_settings
>>> from enumerator.isomers.enumeration import enumerate_isomers
>>> comp = apply_settings(parse_abstract("Ma3b3"), reporters=[("a", "CO")])
>>> fac = enumerate_isomers(comp, load_rules().geometry("OC-6")).isomers[0]
>>> r = fit_constants(fac, "CO", [2010.0, 1920.0], fixed={"kt": 0.6})
>>> [(n, round(v, 3)) for n, v, _, _ in r.constants]
[('k1', 15.368), ('kc', 0.476), ('kt', 0.6)]
"""

from __future__ import annotations

import itertools
import math
import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from enumerator.errors import InputError
from enumerator.isomers.enumeration import Isomer
from enumerator.rules.ruleset import RuleSet
from enumerator.vibrations.forcefield import WAVENUMBER_FACTOR, Band, Model, _blocks_cached, _solve_modes, build_model

__all__ = [
    "Observation",
    "FitResult",
    "fit_constants",
    "parse_bands",
    "fit_linear_model",
    "MAX_ASSIGNMENTS",
    "SCREEN_KEEP",
]

#: At most this many one-to-one assignments are tried in full; beyond it only
#: assignments that keep the measured and predicted orders are tried.
MAX_ASSIGNMENTS = 720

_LABEL = re.compile(r"^([A-Za-z][A-Za-z0-9'\"_+-]*?)(?:\((\d+)\))?$")


@dataclass(frozen=True)
class Observation:
    """One measured band; ``label`` optionally assigns it ('A1', 'A1(2)', 'E')."""

    wavenumber: float
    label: str | None = None


def parse_bands(text: str, option: str = "--bands") -> tuple[Observation, ...]:
    """'2045,1980:B1,1932' -> observations (an optional ':SPECIES' or
    ':SPECIES(n)' after a wavenumber assigns it)."""
    out = []
    for part in (p.strip() for p in text.split(",")):
        if not part:
            continue
        num, _, lab = part.partition(":")
        try:
            v = float(num)
        except ValueError:
            v = float("nan")
        if not math.isfinite(v) or v <= 0:
            raise InputError(
                f"{option}: '{part}' is not a wavenumber",
                f"write e.g. {option} 2045,1980,1932 (cm-1; optionally 1980:B1)",
            )
        lab = lab.strip() or None
        if lab is not None and not _LABEL.match(lab):
            raise InputError(f"{option}: '{lab}' is not a species label", "write e.g. 1980:A1 or 1980:A1(2)")
        out.append(Observation(v, lab))
    if not out:
        raise InputError(f"{option}: no wavenumbers given", f"write e.g. {option} 2045,1980,1932")
    return tuple(sorted(out, key=lambda o: (-o.wavenumber, o.label or "")))


@dataclass(frozen=True)
class FitResult:
    """A fitted force field.

    ``constants``: (name, value, uncertainty or None, how) with how
    'fitted', 'fixed' or 'tied'; ``assignment``: (measured, band name,
    calculated, residual); ``rms`` in cm^-1; ``dof`` = bands − free
    constants."""

    isomer_id: str
    reporter_class: str
    constants: tuple[tuple[str, float, float | None, str], ...]
    assignment: tuple[tuple[float, str, float, float], ...]
    rms: float
    dof: int
    auto_assigned: bool
    bands: tuple[Band, ...]
    notes: tuple[str, ...] = ()
    tried: int = 1

    def value(self, name: str) -> float:
        for n, v, _, _ in self.constants:
            if n == name:
                return v
        raise KeyError(name)

    def to_json(self) -> dict:
        return {
            "constants": [
                {"name": n, "value": round(v, 4), "uncertainty": None if s is None else round(s, 4), "status": how}
                for n, v, s, how in self.constants
            ],
            "assignment": [
                {"measured": round(m, 1), "band": b, "calculated": round(c, 1), "residual": round(r, 1)}
                for m, b, c, r in self.assignment
            ],
            "rms": round(self.rms, 2),
            "dof": self.dof,
            "auto_assigned": self.auto_assigned,
            "assignments_tried": self.tried,
            "notes": list(self.notes),
        }


# --------------------------------------------------------------------------
# the generic linear-parameter fit


@dataclass(frozen=True)
class _Problem:
    model: Model
    isomer: Isomer
    f0: np.ndarray = field(compare=False)
    names: tuple[str, ...]
    mats: tuple[np.ndarray, ...] = field(compare=False)
    blocks: tuple = field(default=None, compare=False)


def _modes_for(problem: _Problem, v: np.ndarray):
    f = problem.f0 + sum(x * m for x, m in zip(v, problem.mats))
    return _solve_modes(problem.model, problem.isomer, None, f=f, blocks_info=problem.blocks)[0]


def _key(b: Band) -> tuple[str | None, int]:
    return (b.species, b.order)


def _evaluate(problem: _Problem, v: np.ndarray, targets: Sequence[tuple[str | None, int]]):
    modes = _modes_for(problem, v)
    index = {_key(m.band): m for m in modes}
    gh = np.sqrt(problem.model.g_diag())
    calc = np.zeros(len(targets))
    jac = np.zeros((len(targets), len(problem.mats)))
    for r, t in enumerate(targets):
        m = index.get(t)
        if m is None:
            return None
        lam = m.band.eigenvalue
        calc[r] = m.band.wavenumber
        y = m.vectors
        gy = gh[:, None] * y
        d = y.shape[1]
        for c, mat in enumerate(problem.mats):
            dl = float(np.trace(gy.T @ mat @ gy)) / d
            jac[r, c] = WAVENUMBER_FACTOR / (2 * math.sqrt(lam)) * dl
    return calc, jac, modes


def _lm(problem: _Problem, v0: np.ndarray, targets, observed: np.ndarray, iterations: int = 60):
    v = v0.astype(float).copy()
    try:
        got = _evaluate(problem, v, targets)
    except InputError:
        return None
    if got is None:
        return None
    calc, jac, modes = got
    rss = float(np.sum((calc - observed) ** 2))
    mu = 1e-3
    for _ in range(iterations):
        r = calc - observed
        jtj = jac.T @ jac
        g = jac.T @ r
        damp = mu * np.diag(np.diag(jtj) + 1e-12)
        try:
            step = -np.linalg.solve(jtj + damp, g)
        except np.linalg.LinAlgError:
            step = -np.linalg.lstsq(jtj + damp, g, rcond=None)[0]
        trial = v + step
        try:
            got2 = _evaluate(problem, trial, targets)
        except InputError:
            got2 = None
        if got2 is not None:
            rss2 = float(np.sum((got2[0] - observed) ** 2))
            if rss2 <= rss:
                improved = rss - rss2
                v, (calc, jac, modes), rss = trial, got2, rss2
                mu = max(mu / 10, 1e-12)
                if rss < 1e-14 or improved <= 1e-9 * rss or float(np.max(np.abs(step))) < 1e-9:
                    break
                continue
        mu *= 10
        if mu > 1e10:
            break
    return v, calc, jac, modes, rss


def fit_linear_model(
    model: Model,
    isomer: Isomer,
    f0: np.ndarray,
    names: Sequence[str],
    mats: Sequence[np.ndarray],
    start: Sequence[float],
    targets: Sequence[tuple[str | None, int]],
    observed: Sequence[float],
):
    """Fit F = f0 + Σ v_p mats[p] to observed wavenumbers of the target bands;
    returns (values, calculated, jacobian, rss) or None if it fails."""
    problem = _Problem(
        model,
        isomer,
        np.asarray(f0, float),
        tuple(names),
        tuple(np.asarray(m, float) for m in mats),
        _blocks_cached(isomer, model.sites),
    )
    got = _lm(problem, np.asarray(start, float), list(targets), np.asarray(observed, float))
    if got is None:
        return None
    v, calc, jac, _, rss = got
    return v, calc, jac, rss


# --------------------------------------------------------------------------
# the user-facing fit


def _scale(name: str) -> float:
    return 0.2 if name in ("kc", "kt") else 0.5


def _assignments(obs: Sequence[Observation], bands: Sequence[Band]) -> tuple[list[list[tuple[str | None, int]]], bool]:
    """Candidate target lists (one band key per observation)."""
    options: list[list[tuple[str | None, int]]] = []
    for o in obs:
        if o.label is None:
            cands = [_key(b) for b in bands if b.ir_active]
        else:
            m = _LABEL.match(o.label)
            assert m is not None
            sp, order = m.group(1), m.group(2)
            cands = [
                _key(b)
                for b in bands
                if (b.species or "").lower() == sp.lower() and (order is None or b.order == int(order))
            ]
            if not cands:
                names = sorted({b.name for b in bands})
                raise InputError(
                    f"no predicted band '{o.label}' to assign {o.wavenumber:g} cm-1 to",
                    f"bands of this isomer: {', '.join(names)}",
                )
        options.append(cands)
    total = 1
    for c in options:
        total *= max(1, len(c))
    full = total <= MAX_ASSIGNMENTS * 4
    out = []
    if full:
        for combo in itertools.product(*options):
            if len(set(combo)) == len(combo):
                out.append(list(combo))
    if not full or len(out) > MAX_ASSIGNMENTS:
        # order-preserving only: measured (descending) onto predicted (descending)
        order = {_key(b): k for k, b in enumerate(bands)}
        out = []
        for combo in itertools.product(*options):
            ks = [order[c] for c in combo]
            if all(a < b for a, b in zip(ks, ks[1:])):
                out.append(list(combo))
                if len(out) >= MAX_ASSIGNMENTS:
                    break
    return out, not full or len(out) >= MAX_ASSIGNMENTS


#: How many assignments survive the linearised screen and get a full fit.
SCREEN_KEEP = 12


def _screen(problem: _Problem, start: np.ndarray, cands, observed: np.ndarray, names) -> list:
    """Rank candidate assignments by a linearised fit from the starting
    constants (one Gauss–Newton step, exact to first order), and keep the
    best few for the full iteration.  The Jacobian at the start is the same
    for every assignment, so this costs one eigen-solution in all."""
    if len(cands) <= SCREEN_KEEP:
        return list(cands)
    keys = sorted({t for c in cands for t in c}, key=lambda t: (t[0] or "", t[1]))
    got = _evaluate(problem, start, keys)
    if got is None:
        return list(cands)[:SCREEN_KEEP]
    calc0, jac0, _ = got
    row = {t: k for k, t in enumerate(keys)}
    scale = np.array([_scale(n) for n in names])
    scored = []
    for c in cands:
        idx = [row[t] for t in c]
        j = jac0[idx]
        r = observed - calc0[idx]
        step = np.linalg.lstsq(j, r, rcond=None)[0]
        res = r - j @ step
        rms = math.sqrt(float(np.sum(res**2)) / len(r))
        scored.append(((round(rms, 1), float(np.sum((step / scale) ** 2))), c))
    scored.sort(key=lambda x: x[0])
    return [c for _, c in scored[:SCREEN_KEEP]]


def fit_constants(
    isomer: Isomer,
    reporter_class: str,
    measured: Sequence[float | Observation],
    *,
    fixed: Mapping[str, float] | None = None,
    tie_ck: bool = False,
    start: Mapping[str, float] | None = None,
    rules: RuleSet | None = None,
) -> FitResult:
    """Fit the force constants of ``reporter_class`` on ``isomer`` to the
    measured wavenumbers (cm^-1).  ``fixed`` holds constants at given values
    (``k`` holds every stretching constant); ``tie_ck`` sets kt = 2 kc;
    ``start`` overrides the default starting values."""
    model = build_model(isomer, reporter_class, rules)
    obs = tuple(
        sorted(
            (m if isinstance(m, Observation) else Observation(float(m)) for m in measured), key=lambda o: -o.wavenumber
        )
    )
    if not obs:
        raise InputError("no measured bands to fit", "give e.g. --fit 2045,1980,1932")
    values = model.resolve(start)
    fixed = dict(fixed or {})
    for name in fixed:
        if name not in ("k",) + model.parameter_names:
            raise InputError(
                f"cannot fix '{name}': not a constant here", f"constants: {', '.join(('k',) + model.parameter_names)}"
            )
    held: dict[str, float] = {}
    if "k" in fixed:
        for s in model.sets:
            held[s.name] = float(fixed["k"])
    held.update({k: float(v) for k, v in fixed.items() if k != "k"})
    if tie_ck and ("kt" in held) != ("kc" in held):
        raise InputError(
            "kt = 2 kc (tie) conflicts with fixing only one of kc, kt", "fix both or neither, or drop the tie"
        )
    n = len(model.oscillators)
    f0 = np.zeros((n, n))
    names: list[str] = []
    mats: list[np.ndarray] = []
    v0: list[float] = []
    for s in model.sets:
        if s.name in held:
            f0 += held[s.name] * model.derivative(s.name)
        else:
            names.append(s.name)
            mats.append(model.derivative(s.name))
            v0.append(values[s.name])
    if tie_ck:
        if "kc" in held:
            f0 += held["kc"] * model.derivative("kc") + held["kt"] * model.derivative("kt")
        else:
            names.append("kc")
            mats.append(model.derivative("kc") + 2.0 * model.derivative("kt"))
            v0.append(values["kc"])
    else:
        for name in ("kc", "kt"):
            if name in held:
                f0 += held[name] * model.derivative(name)
            elif np.any(model.derivative(name)):
                names.append(name)
                mats.append(model.derivative(name))
                v0.append(values[name])
            else:
                held[name] = values[name]  # no such pair: the constant plays no part
    p = len(names)
    if p == 0:
        raise InputError("every constant is fixed: nothing to fit", "free at least one constant (drop a --fix)")
    if len(obs) < p:
        raise InputError(
            f"{len(obs)} band(s) cannot determine {p} free constants ({', '.join(names)})",
            "give more bands, hold some with --fix (e.g. --fix kt=0.6) or tie kt = 2 kc with --ck",
        )
    base = _solve_modes(model, isomer, values)[0]
    base_bands = [m.band for m in base]
    auto = any(o.label is None or "(" not in o.label for o in obs)
    cands, truncated = _assignments(obs, base_bands)
    if not cands:
        ir = sum(1 for b in base_bands if b.ir_active)
        raise InputError(
            f"{len(obs)} measured bands cannot be matched one-to-one to the {ir} IR-active bands of isomer {isomer.id}",
            "give fewer bands, assign some to Raman bands (e.g. 2020:Eg), or try another isomer",
        )
    observed = np.array([o.wavenumber for o in obs])
    problem = _Problem(model, isomer, f0, tuple(names), tuple(mats), _blocks_cached(isomer, model.sites))
    start_v = np.array(v0)
    best = None
    for targets in _screen(problem, start_v, cands, observed, names):
        got = _lm(problem, start_v, targets, observed)
        if got is None:
            continue
        v, calc, jac, modes, rss = got
        rms = math.sqrt(rss / len(obs))
        penalty = float(sum(((a - b) / _scale(nm)) ** 2 for a, b, nm in zip(v, start_v, names)))
        score = (round(rms, 1), penalty)
        if best is None or score < best[0]:
            best = (score, targets, v, calc, jac, modes, rss)
    if best is None:
        raise InputError(
            "the fit did not converge for any assignment",
            "give better starting constants with --constants or assign the bands",
        )
    _, targets, v, calc, jac, modes, rss = best
    sv = np.linalg.svd(jac, compute_uv=False)
    rank = int(np.sum(sv > 1e-8 * max(1.0, float(sv[0]) if len(sv) else 1.0)))
    if rank < p:
        raise InputError(
            f"the assigned bands fix only {rank} combination(s) of the {p} free constants ({', '.join(names)})",
            "hold some with --fix (e.g. --fix kt=0.6), tie kt = 2 kc with --ck, or add bands of other species (e.g. Raman)",
        )
    dof = len(obs) - p
    notes = []
    sig: list[float | None]
    if dof > 0:
        s2 = rss / dof
        cov = s2 * np.linalg.inv(jac.T @ jac)
        sig = [math.sqrt(max(0.0, float(cov[k, k]))) for k in range(p)]
    else:
        sig = [None] * p
        notes.append("exactly determined (as many bands as free constants): no uncertainties can be given")
    if truncated:
        notes.append(f"only {len(cands)} order-keeping assignments were tried (too many to try all)")
    fitted = dict(zip(names, v))
    sig_of = dict(zip(names, sig))
    rows = []
    for name in model.parameter_names:
        if name in fitted:
            rows.append((name, float(fitted[name]), sig_of[name], "fitted"))
        elif tie_ck and name == "kt" and "kc" in fitted:
            s = sig_of["kc"]
            rows.append(("kt", 2.0 * float(fitted["kc"]), None if s is None else 2.0 * s, "tied"))
        else:
            rows.append((name, float(held.get(name, values[name])), None, "fixed"))
    name_of = {_key(m.band): m.band.name for m in modes}
    assignment = tuple(
        (float(o.wavenumber), name_of[t], float(c), float(c - o.wavenumber)) for o, t, c in zip(obs, targets, calc)
    )
    for n_, val, _, _ in rows:
        if n_ in ("kc", "kt") and val < 0:
            notes.append(f"{n_} came out negative ({val:.3f}): the assignment or the isomer may be wrong")
    return FitResult(
        isomer_id=isomer.id,
        reporter_class=model.reporter_class,
        constants=tuple(rows),
        assignment=assignment,
        rms=math.sqrt(rss / len(obs)),
        dof=dof,
        auto_assigned=auto,
        bands=tuple(m.band for m in modes),
        notes=tuple(notes),
        tried=len(cands),
    )
