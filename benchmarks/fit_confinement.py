"""Fit the default confinement radii to band *shape* and position targets (one process).

The free parameters are the factors of the default rule r₀ = factor × r_cov
(:func:`valband.twocentre.confined_atom`): s, p, d orbital radii and the density radius, power
2. One evaluation, for each metal of the fit (Ni, Cu, Pd, Pt):

1. the confined atom with those factors (scalar-relativistic, "solid" configuration, the atom
   engine's default exchange: with the MacDonald–Vosko relativistic correction since it
   became the default; runs 1–3 in ``benchmarks/results/`` predate it);
2. its like-pair table on the generator's 32-node grid with a coarse two-centre quadrature
   (radial step 0.12, 24 angular points; integrals within ~3×10⁻⁵ eV of the default grid);
3. the one-element parameter set with the generator's cutoff tolerances, the fcc metal at
   ASE's reference lattice constant, a 12³ Monkhorst–Pack DOS (Gaussian 0.1 eV) for E_F and
   the d-band centre, the labelled levels at Γ, X, L (:func:`valband.twocentre.shape.fcc_levels`)
   and the nearest-neighbour dd ratios and distance exponent
   (:func:`~valband.twocentre.shape.dd_shape`).

Cost = Σ ((model − target) / tolerance)² over the targets with role "fit" of
``valband/data/targets/confinement-targets.toml`` (every target's source is in that file); a
level that cannot be found or an atom that fails costs 10⁴. The held-out targets (the metals
Ag, Au, Rh, Ir, and the Cu levels Γ12, X5−X3, X4′, the Cu–Pt hetero ratio) are never in the
cost; they are evaluated at the start and the end and reported separately.

Search: Nelder–Mead (scipy.optimize.minimize) from the given start (default: the factors of
valband-tc-2026), initial simplex +12 % per factor, ``--max-evaluations`` (default 80). No
random choice is made; ``--seed`` (recorded) perturbs the start by ±5 % for restarts.
``--scan`` prints the cost and the measures along the d factor instead (others fixed). Six
start factors (s p d3 d4 d5 density) fit one d factor per row instead (an alternative tried
and recorded in valband.twocentre.confinement).

Run: ``PYTHONPATH=src python benchmarks/fit_confinement.py [--log fit.json]``
(about 4 s per evaluation on one core).
"""

from __future__ import annotations

import argparse
import json
import math
import time

import numpy as np

FIT_METALS = ("Ni", "Cu", "Pd", "Pt")
HELD_OUT_METALS = ("Ag", "Au", "Rh", "Ir")
START = {"s": 1.45, "p": 1.80, "d": 0.85, "density": 1.55}  # valband-tc-2026
PENALTY = 1e4


def _quadrature():
    from valband.twocentre import QuadratureSettings

    return QuadratureSettings(radial_step=0.12, n_angular=24)


def _lattice(el: str) -> float:
    from ase.data import atomic_numbers, reference_states

    return float(reference_states[atomic_numbers[el]]["a"])


ROW = {"Ni": "d3", "Cu": "d3", "Pd": "d4", "Ag": "d4", "Rh": "d4", "Pt": "d5", "Au": "d5",
       "Ir": "d5"}


def atoms_for(metals, factors: dict[str, float]):
    """Confined atoms with the rule ``factors`` (a key d3/d4/d5 overrides d for that row)."""
    from valband.twocentre import confined_atom

    out = {}
    for el in metals:
        f = {"s": factors["s"], "p": factors["p"], "d": factors.get(ROW[el], factors.get("d"))}
        out[el] = confined_atom(el, r0_factors=f, density_factor=factors["density"])
    return out


def _measure(atom) -> dict:
    from valband.params import ParameterSet
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.twocentre.generate import GenerationSettings
    from valband.twocentre.shape import dd_shape, fcc_levels
    from valband.twocentre.tables import pair_table, parameter_set_dict
    from valband.workflows import compute_dos, describe
    from valband.workflows.dos import DOSSettings

    el = atom.symbol
    g = GenerationSettings()
    table = pair_table(atom, atom, g.grid_for(el, el), quadrature=_quadrature())
    ps = ParameterSet.from_dict(parameter_set_dict(
        [table], name=f"fit-{el}", hopping_tol=g.hopping_tol, overlap_tol=g.overlap_tol,
        digits=g.digits))
    a = _lattice(el)
    model = build_model(build_structure(f"{el} fcc {a:.4f}"), ps)
    dos = compute_dos(model, DOSSettings(mesh=12, width=0.1, emin=-16.0))
    d = describe(dos, "d", (-15.0, 5.0)).elements[el]
    return {"levels": fcc_levels(model, dos.fermi_level), "centre": d.centre, "width": d.width,
            "dd": dd_shape(ps, el, a / math.sqrt(2.0))}


def _hetero(atom_a, atom_b) -> float:
    """|ddσ(A–B)| / √(ddσ(A–A) ddσ(B–B)) at B's nearest-neighbour distance."""
    from valband.params.model import BOND_INTEGRALS
    from valband.twocentre import bond_integrals

    r = _lattice(atom_b.symbol) / math.sqrt(2.0)
    k = BOND_INTEGRALS.index("dds")
    v = {}
    for x, y in ((atom_a, atom_b), (atom_a, atom_a), (atom_b, atom_b)):
        v[x.symbol, y.symbol] = bond_integrals(x.site(), y.site(), [r],
                                               quadrature=_quadrature()).hopping[0, k]
    a, b = atom_a.symbol, atom_b.symbol
    return float(abs(v[a, b]) / math.sqrt(v[a, a] * v[b, b]))


def evaluate(factors: dict[str, float], metals) -> dict:
    """Measurements of every metal in ``metals`` (and the Cu–Pt ratio when both are there)."""
    atoms = atoms_for(metals, factors)
    out = {el: _measure(atoms[el]) for el in metals}
    if "Cu" in atoms and "Pt" in atoms:
        out["Cu-Pt"] = {"dd": {"hetero": _hetero(atoms["Cu"], atoms["Pt"])}}
    return out


def residuals(meas: dict, role: str) -> list[dict]:
    """Every target of ``role`` with the model value and (model − target) / tolerance."""
    from valband.twocentre.shape import load_targets, target_value

    rows = []
    for t in load_targets()["target"]:
        if t["role"] != role or t["element"] not in meas:
            continue
        m = meas[t["element"]]
        try:
            val = target_value(t["quantity"], m.get("levels"), m.get("dd"), m.get("centre"))
        except KeyError:
            val = math.nan
        rows.append({**t, "model": val, "z": (val - t["value"]) / t["tolerance"]})
    return rows


def cost(meas: dict) -> float:
    """Σ z² over the fit targets (10⁴ per target that could not be measured)."""
    z = [r["z"] for r in residuals(meas, "fit")]
    return float(sum(PENALTY if not math.isfinite(x) else x * x for x in z))


KEYS = ("s", "p", "d", "density")
KEYS_PER_ROW = ("s", "p", "d3", "d4", "d5", "density")


def _factors(x) -> dict[str, float]:
    keys = KEYS if len(x) == len(KEYS) else KEYS_PER_ROW
    return {k: float(v) for k, v in zip(keys, x, strict=True)}


def summary(rows: list[dict]) -> str:
    lines = []
    for r in rows:
        lines.append(f"  {r['element']:6s} {r['quantity']:17s} target {r['value']:+7.3f} ± "
                     f"{r['tolerance']:.2f}  model {r['model']:+7.3f}  z {r['z']:+6.2f}")
    z = np.array([r["z"] for r in rows])
    err = np.array([abs(r["model"] - r["value"]) for r in rows])
    ev = [e for e, r in zip(err, rows, strict=True)
          if r["quantity"].split(":")[0] in ("level", "spacing", "centre")]
    lines.append(f"  rms z {np.sqrt(np.mean(z ** 2)):.3f}, |z| <= 1 for {np.sum(np.abs(z) <= 1)}"
                 f"/{len(z)}; mean |error| of the eV targets {np.mean(ev):.3f} eV")
    return "\n".join(lines)


def main(argv=None) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--start", type=float, nargs="+", metavar="F",
                   default=[START[k] for k in KEYS],
                   help="start factors: s p d density, or s p d3 d4 d5 density (a d factor "
                   "per row, the alternative of the docstring of valband.twocentre.confinement)")
    p.add_argument("--max-evaluations", type=int, default=80)
    p.add_argument("--seed", type=int, default=None, help="perturb the start by ±5 %% (restarts)")
    p.add_argument("--scan", type=float, nargs="*", default=None, metavar="D",
                   help="instead of fitting, evaluate these d factors (others from --start)")
    p.add_argument("--evaluate", action="store_true", help="only evaluate the start point")
    p.add_argument("--log", default=None, help="write every evaluation to this JSON file")
    args = p.parse_args(argv)
    x0 = np.array(args.start, dtype=float)
    if x0.size not in (len(KEYS), len(KEYS_PER_ROW)):
        p.error(f"--start takes {len(KEYS)} or {len(KEYS_PER_ROW)} factors")
    if args.seed is not None:
        x0 = x0 * (1 + 0.05 * np.random.default_rng(args.seed).uniform(-1, 1, x0.size))
    log: list[dict] = []
    t0 = time.perf_counter()

    def f(x) -> float:
        fac = _factors(x)
        try:
            meas = evaluate(fac, FIT_METALS)
            c = cost(meas)
        except Exception as exc:  # an atom that does not converge: a large cost, not a crash
            meas, c = {"error": repr(exc)}, PENALTY * 10
        log.append({"factors": fac, "cost": c})
        text = " ".join(f"{k} {v:.4f}" for k, v in fac.items())
        print(f"eval {len(log):3d}  {text}  cost {c:9.3f}  ({time.perf_counter() - t0:.0f} s)",
              flush=True)
        return c

    if args.scan is not None:
        for dval in args.scan:
            fac = _factors(x0)
            for key in ("d", "d3", "d4", "d5"):
                if key in fac:
                    fac[key] = dval
            meas = evaluate(fac, FIT_METALS + HELD_OUT_METALS)
            print(f"d factor {dval}: cost {cost(meas):.3f}")
            print(summary(residuals(meas, "fit")))
            print(summary(residuals(meas, "held-out")))
        return 0

    if not args.evaluate:
        from scipy.optimize import minimize

        n = x0.size
        simplex = np.vstack([x0] + [x0 * (1 + 0.12 * np.eye(n)[i]) for i in range(n)])
        res = minimize(f, x0, method="Nelder-Mead",
                       options={"initial_simplex": simplex, "maxfev": args.max_evaluations,
                                "xatol": 5e-3, "fatol": 1e-2})
        best = _factors(res.x)
    else:
        best = _factors(x0)
    meas = evaluate(best, FIT_METALS + HELD_OUT_METALS)
    fit_rows, held_rows = residuals(meas, "fit"), residuals(meas, "held-out")
    print(f"best factors {best} (cost {cost(meas):.3f}, {len(log)} evaluations, seed "
          f"{args.seed}, {time.perf_counter() - t0:.0f} s)")
    print("fit targets:")
    print(summary(fit_rows))
    print("held-out targets:")
    print(summary(held_rows))
    if args.log:
        with open(args.log, "w", encoding="utf-8") as fh:
            json.dump({"start": _factors(x0), "seed": args.seed, "best": best,
                       "evaluations": log, "fit": fit_rows, "held_out": held_rows}, fh, indent=1)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
