"""``valband params``: generate first-principles parameter sets, summarise a set, fit one to bands.

``valband params generate EL1 EL2 …`` writes a two-centre set for the elements and all their
pairs (:mod:`valband.twocentre.generate`); ``valband params show SET`` summarises a set;
``valband params fit SET REFERENCE --structure SPEC --out DIR`` refines a set against reference
band energies (:mod:`valband.params.fitting`); ``valband params orthogonal SET --out FILE.toml``
fits an orthogonal counterpart of a set to its bands (:mod:`valband.params.orthogonal`).
"""

from __future__ import annotations

import shlex
import sys

__all__ = ["add_arguments", "run", "JSON_SCHEMA"]

JSON_SCHEMA = "valband.params"


def add_arguments(p) -> None:
    """Sub-commands and options of ``valband params``."""
    sub = p.add_subparsers(dest="params_command", metavar="ACTION")
    sub.required = True
    g = sub.add_parser("generate", help="two-centre set from confined LDA atoms for elements and "
                       "all their pairs", description="Generate a non-orthogonal two-centre "
                       "Slater-Koster set (confined scalar-relativistic LDA atoms).")
    g.add_argument("elements", nargs="+", metavar="EL", help="element symbols, e.g. Cu Pd")
    g.add_argument("--out", default=None, metavar="FILE.toml",
                   help="file to write (default NAME.toml in the current folder)")
    g.add_argument("--name", default=None, help="name of the set (default twocentre-EL1-EL2...)")
    g.add_argument("--description", default=None, help="one-line description of the set")
    g.add_argument("--r0", action="append", default=[], metavar="EL[:SHELL]=BOHR",
                   help="orbital confinement radius in bohr for an element (all shells) or one "
                   "shell, e.g. Cu=4.5 or Cu:p=4.0 (repeatable; default: the per-shell rule of "
                   "valband.twocentre.confinement)")
    g.add_argument("--r0-density", action="append", default=[], metavar="EL=BOHR",
                   help="density confinement radius in bohr for an element (repeatable)")
    g.add_argument("--rule", default=None, metavar="s=F,p=F,d=F,density=F",
                   help="default rule r0 = F x covalent radius for elements without --r0 / "
                   "--r0-density (default: the fitted rule of valband.twocentre.confinement, "
                   "s 1.29, p 1.71, d 1.68, density 1.28; valband-tc-2026 used s=1.45,p=1.8,"
                   "d=0.85,density=1.55); shells not named keep the default")
    g.add_argument("--distances", default=None, metavar="N|MIN:MAX:N",
                   help="distance grid: N nodes over 0.6-3.2 times the covalent-radius sum of "
                   "each pair (default 32), or MIN:MAX:N in Å for every pair")
    g.add_argument("--relativity", default="scalar", choices=["scalar", "none"],
                   help="atoms (default scalar-relativistic)")
    g.add_argument("--relativistic-exchange", default="auto", choices=["auto", "on", "off"],
                   help="MacDonald-Vosko relativistic correction of the atoms' LDA exchange "
                   "(default auto: on with scalar relativity)")
    g.add_argument("--jobs", type=int, default=1, help="worker processes for the pair tables")
    g.add_argument("--quiet", action="store_true", help="no progress messages")

    s = sub.add_parser("show", help="summarise a parameter set (elements, orbitals, onsite "
                       "energies, pair cutoffs and ranges, provenance)")
    s.add_argument("set", metavar="SET", help="shipped set name or .toml path")
    s.add_argument("--json", action="store_true", help="print the summary as JSON")
    s.add_argument("--pairs", action="store_true", help="list every pair (default: a digest when "
                   "there are more than 12)")

    f = sub.add_parser("fit", help="refine a set against reference band energies",
                       description="Refine onsite energies, hopping scale factors and "
                       "(optionally) distance exponents against reference bands.")
    f.add_argument("set", metavar="SET", help="starting set: shipped name or .toml path")
    f.add_argument("reference", metavar="REFERENCE",
                   help="reference bands: a valband reference-band text file or an ASE "
                   "BandStructure JSON file (format: valband.params.reference_bands)")
    f.add_argument("--structure", required=True, metavar="SPEC",
                   help="structure file or build spec whose reciprocal cell the k-points use")
    f.add_argument("--out", required=True, metavar="DIR", help="folder for the refined set and "
                   "the report")
    f.add_argument("--name", default=None, help="name of the refined set (default SET-fit)")
    f.add_argument("--free", default="onsite,scale",
                   help="free parameters: comma list of onsite, scale, exponent "
                   "(default onsite,scale)")
    f.add_argument("--per-integral", action="store_true",
                   help="one scale/exponent per integral instead of per class (ss ... dd)")
    f.add_argument("--window", type=float, nargs=2, metavar=("EMIN", "EMAX"), default=None,
                   help="fit reference energies in this window (eV, relative to the reference "
                   "Fermi level when the file gives one)")
    f.add_argument("--band-weights", default=None, metavar="W1,W2,...",
                   help="weight of each reference band (overrides the file's)")
    f.add_argument("--fixed-shift", type=float, default=None, metavar="EV",
                   help="fix the alignment: model = reference + EV (default: free)")
    f.add_argument("--reference-skip", type=int, default=0,
                   help="skip this many lowest reference bands (e.g. semicore)")
    f.add_argument("--model-first", type=int, default=0,
                   help="model band matched with the first used reference band")
    f.add_argument("--max-evaluations", type=int, default=400,
                   help="residual evaluations allowed (default 400)")
    f.add_argument("--format", default="png", choices=["png", "svg"], help="plot format")
    f.add_argument("--json", action="store_true", help="print the report as JSON")


    o = sub.add_parser("orthogonal", help="fit an orthogonal counterpart of a set to its bands "
                       "(for CPA and fast KPM)",
                       description="Fit an orthogonal s p d set to the band energies of a "
                       "(non-orthogonal) set on its absolute energy scale: like pairs fitted "
                       "per element on fcc/bcc/hcp crystals at several strains, unlike pairs "
                       "from a combination rule (valband.params.orthogonal).")
    o.add_argument("set", metavar="SET", help="source set: shipped name or .toml path")
    o.add_argument("--out", required=True, metavar="FILE.toml", help="file to write")
    o.add_argument("--name", default=None, help="name of the new set (default SET-orth)")
    o.add_argument("--elements", default=None, metavar="EL1,EL2,...",
                   help="only these elements and their pairs (default: all of the source)")
    o.add_argument("--mesh", type=int, default=None,
                   help="Γ-centred k-mesh per axis of every fitted crystal (default 6)")
    o.add_argument("--max-evaluations", type=int, default=None,
                   help="residual evaluations per element (default 60)")
    o.add_argument("--pair-threshold", type=float, default=None, metavar="EV",
                   help="refit unlike pairs whose combination rule misses the source's compound "
                   "bands by more than this RMS (default 0.35 eV)")
    o.add_argument("--rule-only", action="store_true",
                   help="no pair refits: every unlike pair from the combination rule")
    o.add_argument("--json", action="store_true", help="print the fit quality as JSON")
    o.add_argument("--quiet", action="store_true", help="no progress messages")


def _pairs_of(option: str, items: list[str], shells: bool) -> dict:
    from valband.errors import SettingsError

    out: dict = {}
    for item in items:
        key, sep, val = item.partition("=")
        el, _, sh = key.partition(":")
        try:
            x = float(val)
        except ValueError:
            x = float("nan")
        if not sep or not el or not (x > 0 and x < 1e3) or (sh and (not shells or sh not in "spd"
                                                                     or len(sh) != 1)):
            form = "EL=BOHR or EL:SHELL=BOHR (SHELL s, p or d)" if shells else "EL=BOHR"
            raise SettingsError(f"{option} {item!r}; accepted: {form} with a radius > 0 bohr")
        out.setdefault(el, {})[sh or "*"] = x
    return out


def _rule(text: str | None) -> dict:
    from valband.errors import SettingsError

    if text is None:
        return {}
    out: dict = {}
    for item in text.split(","):
        key, sep, val = item.strip().partition("=")
        try:
            x = float(val)
        except ValueError:
            x = float("nan")
        if not sep or key not in ("s", "p", "d", "density") or key in out or not (0 < x < 100):
            raise SettingsError(f"--rule {text!r}; accepted: comma-separated s=F, p=F, d=F, "
                                "density=F with factors 0 < F < 100 (each at most once)")
        out[key] = x
    from valband.twocentre.confinement import DENSITY_R0_FACTOR, SHELL_R0_FACTORS

    factors = {sh: out.get(sh, f) for sh, f in SHELL_R0_FACTORS.items()}
    return {"r0_factors": factors, "density_factor": out.get("density", DENSITY_R0_FACTOR)}


def _distances(text: str | None) -> dict:
    from valband.errors import SettingsError

    if text is None:
        return {}
    parts = text.split(":")
    try:
        if len(parts) == 1:
            return {"n_distances": int(parts[0])}
        if len(parts) == 3:
            import numpy as np

            lo, hi, n = float(parts[0]), float(parts[1]), int(parts[2])
            if not (0 < lo < hi and n >= 8):
                raise ValueError
            return {"distances": tuple(float(x) for x in np.linspace(lo, hi, n)),
                    "n_distances": n}
    except ValueError:
        pass
    raise SettingsError(f"--distances {text!r}; accepted: N (8-400 nodes) or MIN:MAX:N in Å "
                        "with 0 < MIN < MAX and N >= 8")


def _generate(args) -> int:
    from pathlib import Path

    from valband.output import atomic_write
    from valband.params import ParameterSet, dumps
    from valband.twocentre.generate import (
        GenerationSettings,
        generate_parameter_set,
        sorted_elements,
    )

    els = sorted_elements(args.elements)
    r0 = _pairs_of("--r0", args.r0, shells=True)
    rho = _pairs_of("--r0-density", args.r0_density, shells=False)
    settings = GenerationSettings(
        relativity=args.relativity,
        relativistic_exchange=args.relativistic_exchange,
        r0={el: v["*"] for el, v in r0.items() if "*" in v},
        shell_r0={el: {k: x for k, x in v.items() if k != "*"} for el, v in r0.items()
                  if set(v) - {"*"}},
        r0_density={el: v["*"] for el, v in rho.items()},
        **_distances(args.distances),
        **_rule(args.rule),
    )
    name = args.name or "twocentre-" + "-".join(els)
    out = Path(args.out or f"{name}.toml")
    if out.suffix != ".toml":
        from valband.errors import SettingsError

        raise SettingsError(f"--out {out}: accepted: a file name ending in .toml")

    def progress(msg: str) -> None:
        if not args.quiet:
            print(f"  {msg}", file=sys.stderr, flush=True)

    words = ["valband", "params", "generate", *els]
    for opt in ("out", "name", "description", "distances", "relativity",
                "relativistic-exchange", "rule"):
        value = getattr(args, opt.replace("-", "_"))
        if value is not None:
            words += [f"--{opt}", str(value)]
    for opt, values in (("--r0", args.r0), ("--r0-density", args.r0_density)):
        for v in values:
            words += [opt, v]
    command = " ".join(shlex.quote(w) for w in words)
    data, info = generate_parameter_set(els, settings, name=name, description=args.description,
                                        jobs=args.jobs, progress=progress, command=command)
    ParameterSet.from_dict(data, origin=str(out))  # validate before writing
    text = dumps(data)
    with atomic_write(out) as fh:
        fh.write(text)
    print(f"wrote {out}: {len(info['elements'])} elements, {info['n_pairs']} pairs "
          f"({info['atoms_s']:.1f} s atoms, {info['pairs_s']:.1f} s pair tables, "
          f"{len(text) / 1e6:.2f} MB)")
    rule = ", ".join(f"{sh} {f:g}" for sh, f in settings.r0_factors.items())
    print(f"confinement rule r0 = factor x r_cov: {rule}, density {settings.density_factor:g} "
          "(elements without --r0/--r0-density); recorded in the provenance")
    return 0


def _range_of(law) -> tuple[float, float] | None:
    r = getattr(law, "r", None)
    if r:
        return float(r[0]), float(r[-1])
    shells = getattr(law, "shells", None)
    if shells:
        return float(shells[0][0]), float(shells[-1][0])
    return None


def _show_summary(ps) -> dict:
    import json

    summary = ps.summary()
    record = None
    from valband.twocentre.generate import PROVENANCE_PREFIX

    if ps.provenance.startswith(PROVENANCE_PREFIX):
        try:
            record = json.loads(ps.provenance[len(PROVENANCE_PREFIX):].split(" | ", 1)[0])
        except json.JSONDecodeError:
            record = None
    elif ps.provenance.startswith("{"):  # e.g. valband params orthogonal writes a JSON record
        try:
            record = json.loads(ps.provenance)
        except json.JSONDecodeError:
            record = None
    pairs = {}
    for p in ps.pairs.values():
        ranges = [x for x in (_range_of(law) for law in p.hopping.values()) if x]
        pairs[p.key] = {
            "cutoff_inner_A": p.cutoff.inner, "cutoff_A": p.cutoff.outer, "taper": p.cutoff.taper,
            "integrals": sorted(p.hopping),
            "laws": sorted({law.kind for law in p.hopping.values()}),
            "tabulated_from_A": min((x[0] for x in ranges), default=None),
            "tabulated_to_A": max((x[1] for x in ranges), default=None),
        }  # fmt: skip
    return {
        "schema": JSON_SCHEMA, "schema_version": 1,
        "name": ps.name, "version": ps.version, "origin": ps.origin,
        "description": ps.description, "orthogonal": ps.orthogonal,
        "orthogonal_counterpart": ps.orthogonal_counterpart,
        "elements": {el: {"shells": d["shells"], "onsite_eV": d["onsite_eV"],
                          "valence_electrons": d["valence_electrons"]}
                     for el, d in summary["elements"].items()},
        "pairs": pairs,
        "provenance": record if record is not None else ps.provenance,
    }  # fmt: skip


def _show(args) -> int:
    from valband.output import to_json
    from valband.params import load_parameter_set

    ps = load_parameter_set(args.set)
    s = _show_summary(ps)
    if args.json:
        sys.stdout.write(to_json(s) + "\n")
        return 0
    kind = "orthogonal" if s["orthogonal"] else "non-orthogonal"
    print(f"{s['name']} (version {s['version']}), {kind}; {s['origin']}")
    print(f"  {s['description']}")
    if s["orthogonal_counterpart"]:
        print(f"  orthogonal counterpart: {s['orthogonal_counterpart']}")
    print(f"elements ({len(s['elements'])}):  onsite energies in eV")
    for el, d in s["elements"].items():
        onsite = "  ".join(f"{sh} {v:8.3f}" for sh, v in d["onsite_eV"].items())
        print(f"  {el:3s} {''.join(d['shells']):4s} N_val {d['valence_electrons']:5.2f}   {onsite}")
    pairs = s["pairs"]
    print(f"pairs ({len(pairs)}):  cutoff (taper start-end) and tabulated range, Å")
    keys = list(pairs)
    if len(keys) > 12 and not args.pairs:
        cut = [p["cutoff_A"] for p in pairs.values()]
        print(f"  cutoffs {min(cut):.2f}-{max(cut):.2f} Å; first and last pairs "
              "(--pairs lists all):")
        keys = keys[:6] + keys[-6:]
    for k in keys:
        p = pairs[k]
        rng = ("" if p["tabulated_from_A"] is None
               else f"  tabulated {p['tabulated_from_A']:.2f}-{p['tabulated_to_A']:.2f}")
        print(f"  {k:7s} {p['cutoff_inner_A']:.2f}-{p['cutoff_A']:.2f}{rng}  "
              f"{'/'.join(p['laws'])}, {len(p['integrals'])} integrals")
    prov = s["provenance"]
    print("provenance:")
    if isinstance(prov, dict):
        for key in ("method", "functional", "onsite", "valband_version", "command"):
            if key in prov:
                print(f"  {key}: {prov[key]}")
        gen = prov.get("generation")
        if gen:
            print(f"  confinement: power {gen['power']}, configuration rule "
                  f"{gen['configuration']!r}, relativity {gen['relativity']}, relativistic "
                  f"exchange {gen.get('relativistic_exchange', 'off')}")
        q = prov.get("quadrature")
        if q:
            print(f"  quadrature: {q.get('n_radial')} radial x {q.get('n_angular')} angular "
                  "points per centre")
        if isinstance(prov.get("band_rms_eV"), dict):  # an orthogonal counterpart's fit
            src = prov.get("source_set", {})
            print(f"  fitted to the bands of {src.get('name')} in {prov.get('seconds')} s; band "
                  "rms (eV, E_F-10..+3 eV, fitted / held-out strains):")
            print("   " + ", ".join(f"{el} {q['window_fit']:.2f}/{q['window_held_out']:.2f}"
                                    for el, q in prov["band_rms_eV"].items()))
            up = prov.get("unlike_pairs", {})
            if isinstance(up, dict):
                print(f"  unlike pairs: {up.get('rule')}; {len(up.get('refitted', {}))} "
                      f"refitted to compounds (rule rms > {up.get('refit_above_eV')} eV)")
        conf = prov.get("confinement", {})
        for el, c in list(conf.items())[:20]:
            radii = ", ".join(f"{sh} {v:.2f}" for sh, v in c.get("r0_orbitals_bohr", {}).items())
            print(f"  {el}: {c.get('configuration', '')}; r0 (bohr) {radii}; density "
                  f"{c.get('r0_density_bohr', float('nan')):.2f}")
    else:
        print(f"  {prov}")
    return 0


def _fit(args) -> int:

    import numpy as np

    from valband.errors import CalculationError, SettingsError
    from valband.output import atomic_write, prepare_out_dir, to_json, write_csv, write_json
    from valband.params import dumps, load_parameter_set
    from valband.params.fitting import FitSettings, fit_parameter_set, plot_fit
    from valband.params.reference_bands import read_reference_bands
    from valband.structure import load_structure

    ps = load_parameter_set(args.set)
    ref = read_reference_bands(args.reference)
    structure = load_structure(args.structure)
    weights = None
    if args.band_weights:
        try:
            weights = tuple(float(x) for x in args.band_weights.split(","))
        except ValueError:
            raise SettingsError(f"--band-weights {args.band_weights!r}; accepted: comma-separated "
                                "numbers >= 0, one per reference band") from None
    settings = FitSettings(
        free=tuple(x.strip() for x in args.free.split(",") if x.strip()),
        classes="integral" if args.per_integral else "class",
        window=tuple(args.window) if args.window else None,
        shift="fixed" if args.fixed_shift is not None else "free",
        shift_value=args.fixed_shift or 0.0, reference_skip=args.reference_skip,
        model_first=args.model_first, band_weights=weights,
        max_evaluations=args.max_evaluations,
    )  # fmt: skip
    result = fit_parameter_set(ps, structure, ref, settings)
    out = prepare_out_dir(args.out)
    name = args.name or f"{ps.name}-fit"
    data = dict(result.data)
    data["name"] = name
    set_path = out / f"{name}.toml"
    with atomic_write(set_path) as fh:
        fh.write(dumps(data))
    k_idx, b_idx = np.nonzero(np.ones_like(result.reference, dtype=bool))
    write_csv(out / "fit_bands.csv",
              ["k_index", "k1", "k2", "k3", "reference_band", "in_fit", "reference_eV",
               "initial_eV", "fitted_eV", "residual_eV"],
              [k_idx, result.kpoints[k_idx, 0], result.kpoints[k_idx, 1],
               result.kpoints[k_idx, 2], b_idx + settings.reference_skip,
               result.mask[k_idx, b_idx].astype(int), result.reference[k_idx, b_idx],
               result.initial_model[k_idx, b_idx], result.model[k_idx, b_idx],
               (result.model - result.reference)[k_idx, b_idx]],
              comments=[f"valband params fit; reference {ref.source}; energies on the model "
                        f"scale (reference + shift {result.shift:+.6f} eV)"])
    plot = out / f"fit_residuals.{args.format}"
    plot_fit(result, plot)
    report = {"schema": JSON_SCHEMA + ".fit", "schema_version": 1,
              "set": ps.name, "refined_set": str(set_path), "reference": ref.source,
              "structure": str(args.structure), "plot": str(plot), **result.to_dict()}
    write_json(out / "fit_report.json", report)
    if args.json:
        sys.stdout.write(to_json(report) + "\n")
    else:
        _print_fit(result, set_path, plot)
    if not result.converged:
        raise CalculationError(
            f"the fit did not converge ({result.message}, {result.evaluations} evaluations); the "
            f"partial result and its report are in {out}; accepted: more --max-evaluations, "
            "fewer free parameters or a narrower --window"
        )
    return 0


def _print_fit(result, set_path, plot) -> None:
    print(f"fit {'converged' if result.converged else 'DID NOT CONVERGE'}: {result.message} "
          f"({result.evaluations} evaluations); rms {result.rms_initial:.4f} -> "
          f"{result.rms:.4f} eV; alignment shift {result.shift:+.4f} eV")
    print("per band (eV):   ref  model  points  weight  rms before  rms after  max |res|")
    for b in result.bands:
        print(f"  {b.reference_band:14d} {b.model_band:6d} {b.n_points:7d} {b.weight:7.3g} "
              f"{b.rms_initial:11.4f} {b.rms:10.4f} {b.max_abs:10.4f}")
    print("parameters:      start      fitted     bounds")
    for p in result.parameters:
        flag = "  (at bound)" if p.at_bound else ""
        print(f"  {p.kind:8s} {p.target:12s} {p.initial:8.4f} {p.value:10.5f}   "
              f"[{p.lower:g}, {p.upper:g}]{flag}")
    print(f"refined set: {set_path}\nplot: {plot}")


def _orthogonal(args) -> int:
    import json
    from pathlib import Path

    from valband.errors import SettingsError
    from valband.output import atomic_write
    from valband.params import ParameterSet, dumps, load_parameter_set
    from valband.params.orthogonal import OrthogonalFitSettings, fit_orthogonal_set

    out = Path(args.out)
    if out.suffix != ".toml":
        raise SettingsError(f"--out {out}: accepted: a file name ending in .toml")
    source = load_parameter_set(args.set)
    kw = {}
    if args.mesh is not None:
        kw["mesh"] = args.mesh
    if args.max_evaluations is not None:
        kw["max_evaluations"] = args.max_evaluations
    if args.pair_threshold is not None:
        kw["pair_threshold"] = args.pair_threshold
    if args.rule_only:
        kw["pair_threshold"] = None
    settings = OrthogonalFitSettings(**kw)
    els = None
    if args.elements:
        els = [e.strip() for e in args.elements.split(",") if e.strip()]
    words = ["valband", "params", "orthogonal", args.set, "--out", args.out]
    for opt in ("name", "elements", "mesh", "max_evaluations", "pair_threshold"):
        value = getattr(args, opt)
        if value is not None:
            words += [f"--{opt.replace('_', '-')}", str(value)]
    if args.rule_only:
        words.append("--rule-only")
    command = " ".join(shlex.quote(w) for w in words)

    def progress(msg: str) -> None:
        if not args.quiet:
            print(f"  {msg}", file=sys.stderr, flush=True)

    result = fit_orthogonal_set(source, els, settings, name=args.name, command=command,
                                progress=progress)
    ParameterSet.from_dict(result.data, origin=str(out))  # validate before writing
    with atomic_write(out) as fh:
        fh.write(dumps(result.data))
    ps = result.parameter_set
    if args.json:
        print(json.dumps({"schema": JSON_SCHEMA, "file": str(out), "name": ps.name,
                          "seconds": result.seconds, "quality": result.quality(),
                          "pairs": {k: p.to_dict() for k, p in result.pairs.items()}},
                         indent=2))
        return 0
    print(f"wrote {out}: orthogonal set {ps.name!r}, {len(ps.elements)} elements, "
          f"{len(ps.pairs)} pairs, {result.seconds:.0f} s")
    print("band rms in the window E_F-10..E_F+3 eV (eV): element fitted held-out max-held-out")
    for el, q in result.quality().items():
        print(f"  {el:3s} {q['rms_window_fit']:8.3f} {q['rms_window_check']:8.3f} "
              f"{q['max_window_check']:8.3f}")
    refit = [p for p in result.pairs.values() if p.fitted]
    print(f"unlike pairs: {len(result.pairs)} checked on B2/L1_2 compounds, {len(refit)} refitted"
          + (f" (rule rms > {settings.pair_threshold:g} eV)" if settings.pair_threshold is not None
             else ""))
    if not source.orthogonal:
        print(f"to let {source.name} name it, add to its top level: "
              f"orthogonal_counterpart = \"{out.name}\" (a path relative to the set's file) "
              "or the shipped name")
    return 0


def run(args) -> int:
    """Dispatch to generate, show, fit or orthogonal."""
    return {"generate": _generate, "show": _show, "fit": _fit,
            "orthogonal": _orthogonal}[args.params_command](args)
