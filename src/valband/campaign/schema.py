"""Read and validate a campaign file (schema in :mod:`valband.campaign`), expand its candidates.

Every problem raises :class:`~valband.errors.InputError` naming the file, the line, the key
(dotted, e.g. ``system[2].kpm.resolution``) and what is accepted.
"""

from __future__ import annotations

import copy
import hashlib
import json
import math
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from valband.campaign.locate import KeyLines
from valband.defaults import DEFAULT_PARAMETER_SET
from valband.errors import InputError, ValbandError

__all__ = ["CAMPAIGN_SCHEMA", "Campaign", "Candidate", "load_campaign", "parse_campaign",
           "METHODS"]

#: Version of the campaign file schema this module reads.
CAMPAIGN_SCHEMA = 1
#: Methods a candidate may ask for.
METHODS = ("kmesh", "kpm", "cpa")
_SHELLS = ("s", "p", "d")

_BUILTIN_DEFAULTS: dict[str, Any] = {
    "params": DEFAULT_PARAMETER_SET,
    "method": "kmesh",
    "strains": [0.0],
    "strain_mode": "uniform",
    "descriptors": ["d"],
    "window": None,
    "spectra": [],
    "spectrum_fwhm": 0.3,
    "temperature": 300.0,
    "kmesh": {"mesh": 12, "smearing": "gaussian", "width": 0.1, "step": 0.02},
    "kpm": {"resolution": 0.1, "accuracy": 0.05, "resolve": "element"},
    "cpa": {},
}
_KMESH_KEYS = ("mesh", "smearing", "width", "step", "symmetry", "mesh_kind", "neutral")
_KPM_KEYS = ("resolution", "accuracy", "n_moments", "n_vectors", "trace", "resolve", "step",
             "margin", "repeat", "memory_mb", "lanczos_steps")
_OPTION_KEYS = tuple(k for k in _BUILTIN_DEFAULTS)
_SYSTEM_KEYS = ("name", "elements", "step", "fractions", "structures", "pure") + _OPTION_KEYS
_CAMPAIGN_KEYS = ("name", "description", "seed", "scheduler", "workers")
_TOP_KEYS = ("schema", "campaign", "defaults", "system")
_PLACEHOLDERS = ("composition", "element", "A", "B", "C", "seed")


@dataclass(frozen=True)
class Candidate:
    """One calculation of a campaign.

    ``inputs`` is the JSON-ready record of everything that determines the result (structure
    spec with the strain, composition, parameter set and its file hash, method and its
    settings, descriptors, spectra, seed); ``key`` is the first 20 hex digits of its SHA-256.
    """

    position: int
    key: str
    inputs: dict

    @property
    def label(self) -> str:
        """Short human label: system, structure spec, method."""
        i = self.inputs
        return f"{i['system']}: {i['structure']} [{i['method']}]"


@dataclass(frozen=True)
class Campaign:
    """A validated campaign: metadata and its expanded candidate list."""

    path: str
    name: str
    description: str
    seed: int
    scheduler: str | None
    workers: int | None
    candidates: tuple[Candidate, ...]
    fingerprint: str
    systems: tuple[dict, ...] = field(default_factory=tuple)

    @property
    def elements(self) -> tuple[str, ...]:
        """Every element named by a composition grid, in order of appearance."""
        out: dict[str, None] = {}
        for c in self.candidates:
            for e in (c.inputs.get("composition") or {}):
                out.setdefault(e, None)
        return tuple(out)


# ------------------------------------------------------------------------------ errors
class _Ctx:
    """File name and key lines, to build messages."""

    def __init__(self, path: str, text: str) -> None:
        self.path = path
        self.text = text.splitlines()
        self.lines = KeyLines(text)

    def fail(self, where: tuple, problem: str) -> InputError:
        line = self.lines.line(where)
        if line is not None and where and isinstance(where[-1], int):
            line = self._item_line(line, where)
        name = _dotted(where)
        at = f"line {line}" if line is not None else "line unknown"
        return InputError(f"campaign {self.path}: {at}, key {name!r}: {problem}")


    def _item_line(self, line: int, where: tuple) -> int:
        """For an item of a multi-line array, the line that holds it (if it is a string)."""
        value = self._value(where)
        if not isinstance(value, str):
            return line
        for k in range(line - 1, min(len(self.text), line + 200)):
            if f'"{value}"' in self.text[k] or f"'{value}'" in self.text[k]:
                return k + 1
        return line

    def _value(self, where: tuple):
        node = getattr(self, "data", None)
        for p in where:
            try:
                node = node[p]
            except (KeyError, IndexError, TypeError):
                return None
        return node


def _dotted(where: tuple) -> str:
    out = ""
    for p in where:
        if isinstance(p, int):
            out += f"[{p}]"
        else:
            out += ("." if out else "") + str(p)
    return out or "(top level)"


# ------------------------------------------------------------------------------ checks
def _check_keys(ctx: _Ctx, where: tuple, table: dict, accepted: tuple) -> None:
    for k in table:
        if k not in accepted:
            raise ctx.fail(where + (k,), f"unknown key; accepted here: {', '.join(accepted)}")


def _number(ctx, where, v, lo=-math.inf, hi=math.inf, what="a number", integer=False):
    ok = isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v)
    if ok and integer:
        ok = isinstance(v, int)
    if not ok or not lo <= v <= hi:
        rng = "" if (lo, hi) == (-math.inf, math.inf) else f" in [{lo}, {hi}]"
        raise ctx.fail(where, f"{v!r} is not {what}{rng}")
    return v


def _string(ctx, where, v, choices=None):
    if not isinstance(v, str) or not v.strip():
        raise ctx.fail(where, f"{v!r} is not a non-empty string")
    if choices is not None and v not in choices:
        raise ctx.fail(where, f"{v!r}; accepted: {', '.join(choices)}")
    return v


def _list(ctx, where, v, min_len=0):
    if not isinstance(v, list) or len(v) < min_len:
        raise ctx.fail(where, f"{v!r} is not a list of at least {min_len} item(s)")
    return v


def _check_options(ctx: _Ctx, where: tuple, opts: dict) -> None:
    """Types and values of the option keys shared by [defaults] and [[system]]."""
    if "params" in opts:
        _string(ctx, where + ("params",), opts["params"])
    if "method" in opts:
        _string(ctx, where + ("method",), opts["method"], METHODS)
    if "strains" in opts:
        for i, e in enumerate(_list(ctx, where + ("strains",), opts["strains"], 1)):
            _number(ctx, where + ("strains", i), e, -0.2, 0.2, "a strain (fraction)")
    if "strain_mode" in opts:
        _string(ctx, where + ("strain_mode",), opts["strain_mode"], ("uniform", "biaxial"))
    if "descriptors" in opts:
        for i, s in enumerate(_list(ctx, where + ("descriptors",), opts["descriptors"], 1)):
            _string(ctx, where + ("descriptors", i), s, _SHELLS)
    if "window" in opts:
        w = opts["window"]
        if not (isinstance(w, list) and len(w) == 2
                and all(isinstance(x, (int, float)) and not isinstance(x, bool) for x in w)
                and w[0] < w[1]):
            raise ctx.fail(where + ("window",), f"{w!r}; accepted: [emin, emax] in eV relative "
                           "to E_F with emin < emax")
    if "spectra" in opts:
        from valband.atom.tables import photon_energy_of

        for i, hv in enumerate(_list(ctx, where + ("spectra",), opts["spectra"])):
            try:
                photon_energy_of(hv)
            except ValbandError as exc:
                raise ctx.fail(where + ("spectra", i), str(exc)) from None
    if "spectrum_fwhm" in opts:
        _number(ctx, where + ("spectrum_fwhm",), opts["spectrum_fwhm"], 0.0, 10.0, "a FWHM (eV)")
    if "temperature" in opts:
        _number(ctx, where + ("temperature",), opts["temperature"], 0.0, 1e4, "a temperature (K)")
    if "kmesh" in opts:
        _check_kmesh(ctx, where + ("kmesh",), opts["kmesh"])
    if "kpm" in opts:
        _check_kpm(ctx, where + ("kpm",), opts["kpm"])
    if "cpa" in opts and not isinstance(opts["cpa"], dict):
        raise ctx.fail(where + ("cpa",), "must be a table")


def _check_kmesh(ctx, where, t) -> None:
    if not isinstance(t, dict):
        raise ctx.fail(where, "must be a table")
    _check_keys(ctx, where, t, _KMESH_KEYS)
    if "mesh" in t:
        m = t["mesh"]
        ok = (isinstance(m, int) and not isinstance(m, bool) and 1 <= m <= 200) or (
            isinstance(m, list) and len(m) == 3 and all(isinstance(x, int) and x >= 1 for x in m)
        ) or (isinstance(m, str) and re.fullmatch(r"\d+(x\d+x\d+)?", m) is not None)
        if not ok:
            raise ctx.fail(where + ("mesh",), f"{m!r}; accepted: N, 'N1xN2xN3' or [N1, N2, N3]")
    if "smearing" in t:
        _string(ctx, where + ("smearing",), t["smearing"], ("gaussian", "lorentzian",
                                                             "tetrahedron"))
    if "width" in t:
        _number(ctx, where + ("width",), t["width"], 1e-4, 5.0, "a width (eV)")
    if "step" in t:
        _number(ctx, where + ("step",), t["step"], 1e-4, 1.0, "an energy step (eV)")
    if "symmetry" in t and not isinstance(t["symmetry"], bool):
        raise ctx.fail(where + ("symmetry",), "must be true or false")
    if "mesh_kind" in t:
        _string(ctx, where + ("mesh_kind",), t["mesh_kind"], ("monkhorst-pack", "gamma"))
    if "neutral" in t:
        from valband.workflows.methods import NEUTRAL_CHOICES

        _string(ctx, where + ("neutral",), t["neutral"], NEUTRAL_CHOICES)


def _check_kpm(ctx, where, t) -> None:
    if not isinstance(t, dict):
        raise ctx.fail(where, "must be a table")
    _check_keys(ctx, where, t, _KPM_KEYS)
    for k, lo, hi, what in (("resolution", 1e-3, 5.0, "a resolution (eV)"),
                            ("accuracy", 1e-3, 1.0, "a relative accuracy"),
                            ("step", 1e-4, 1.0, "an energy step (eV)"),
                            ("margin", 1e-3, 0.5, "a margin"),
                            ("memory_mb", 1.0, 1e6, "a memory budget (MB)")):
        if k in t:
            _number(ctx, where + (k,), t[k], lo, hi, what)
    for k, lo in (("n_moments", 2), ("n_vectors", 1), ("lanczos_steps", 2)):
        if k in t:
            _number(ctx, where + (k,), t[k], lo, 10**6, "an integer", integer=True)
    if "trace" in t:
        _string(ctx, where + ("trace",), t["trace"], ("auto", "stochastic", "exact"))
    if "resolve" in t:
        _string(ctx, where + ("resolve",), t["resolve"], ("element", "site", "layer"))
    if "repeat" in t:
        r = t["repeat"]
        if not (isinstance(r, list) and len(r) == 3
                and all(isinstance(x, int) and not isinstance(x, bool) and x >= 1 for x in r)):
            raise ctx.fail(where + ("repeat",), f"{r!r}; accepted: [N1, N2, N3], integers ≥ 1")


# ------------------------------------------------------------------------------ grids
def _grid(ctx: _Ctx, where: tuple, system: dict) -> list[dict[str, float]] | None:
    """Composition points of a system (None for a system of plain structures)."""
    els = system.get("elements")
    if els is None:
        for k in ("step", "fractions", "pure"):
            if k in system:
                raise ctx.fail(where + (k,), "needs 'elements' (a composition grid)")
        return None
    els = _list(ctx, where + ("elements",), els, 2)
    from ase.data import atomic_numbers

    for i, e in enumerate(els):
        if not isinstance(e, str) or e not in atomic_numbers or e == "X":
            raise ctx.fail(where + ("elements", i), f"{e!r} is not a chemical symbol")
    if len(set(els)) != len(els) or len(els) > 3:
        raise ctx.fail(where + ("elements",), f"{els!r}; accepted: 2 or 3 distinct elements "
                       "(binary or ternary grid)")
    if ("step" in system) == ("fractions" in system):
        raise ctx.fail(where + ("elements",), "give exactly one of 'step' (a regular grid) or "
                       "'fractions' (explicit points)")
    points = []
    if "step" in system:
        step = _number(ctx, where + ("step",), system["step"], 1e-3, 1.0, "a grid step")
        n = round(1.0 / step)
        if abs(n * step - 1.0) > 1e-9:
            raise ctx.fail(where + ("step",), f"{step!r} does not divide 1 (e.g. 0.25, 0.1, 0.05)")
        if len(els) == 2:
            idx = [(n - i, i) for i in range(n + 1)]
        else:
            idx = [(n - i - j, i, j) for i in range(n + 1) for j in range(n + 1 - i)]
        for t in idx:
            points.append({e: k / n for e, k in zip(els, t, strict=True)})
    else:
        for i, f in enumerate(_list(ctx, where + ("fractions",), system["fractions"], 1)):
            w = where + ("fractions", i)
            if not (isinstance(f, list) and len(f) == len(els)):
                raise ctx.fail(w, f"{f!r}: one fraction per element of {els}")
            for k, x in enumerate(f):
                _number(ctx, w + (k,), x, 0.0, 1.0, "a fraction")
            if abs(sum(f) - 1.0) > 1e-9:
                raise ctx.fail(w, f"{f!r} sums to {sum(f):.6g}; fractions must sum to 1")
            points.append({e: float(x) for e, x in zip(els, f, strict=True)})
    return points


def _format_fraction(x: float) -> str:
    return f"{x:.6g}"


def _fill(ctx, where, template: str, values: dict) -> str:
    """Substitute {placeholders}; unknown names and stray braces are errors."""
    names = re.findall(r"\{([^{}]*)\}", template)
    for n in names:
        if n not in _PLACEHOLDERS:
            raise ctx.fail(where, f"unknown placeholder {{{n}}} in {template!r}; accepted: "
                           + ", ".join("{" + p + "}" for p in _PLACEHOLDERS))
        if n not in values:
            raise ctx.fail(where, f"placeholder {{{n}}} in {template!r} has no value here "
                           "(composition placeholders need 'elements')")
    out = re.sub(r"\{([^{}]*)\}", lambda m: str(values[m.group(1)]), template)
    if "{" in out or "}" in out:
        raise ctx.fail(where, f"unbalanced braces in {template!r}")
    return out


# ------------------------------------------------------------------------------ candidates
def _merge(base: dict, over: dict) -> dict:
    out = copy.deepcopy(base)
    for k, v in over.items():
        if k in ("kmesh", "kpm", "cpa") and isinstance(v, dict):
            out[k] = {**out.get(k, {}), **v}
        elif k in _OPTION_KEYS:
            out[k] = copy.deepcopy(v)
    return out


def _params_record(ctx, where, name: str, base_dir: Path) -> dict:
    """Resolve a parameter-set name or path; check it loads; hash files for provenance."""
    from valband.params import load_parameter_set

    looks_like_path = name.endswith(".toml") or "/" in name or "\\" in name
    ref = str((base_dir / name).resolve()) if looks_like_path else name
    try:
        ps = load_parameter_set(ref)
    except ValbandError as exc:
        raise ctx.fail(where, f"parameter set {name!r} cannot be loaded: {exc}") from None
    rec = {"ref": ref, "name": str(ps.name), "version": str(ps.version)}
    if looks_like_path:
        rec["sha256"] = hashlib.sha256(Path(ref).read_bytes()).hexdigest()
    return rec


def _sha(obj) -> str:
    return hashlib.sha256(json.dumps(obj, sort_keys=True, separators=(",", ":"))
                          .encode()).hexdigest()


def _identity(inputs: dict) -> dict:
    """Return the inputs that identify a calculation.

    A parameter file counts by its content hash, not by where it lies; the structure
    template a one-element point came through (its plot series) does not count, so the pure
    ends shared by several templates are computed once.
    """
    inputs = {k: v for k, v in inputs.items() if k != "template"}  # the series, not the job
    params = inputs["params"]
    if "sha256" in params:
        inputs = {**inputs, "params": {k: v for k, v in params.items() if k != "ref"}}
    return inputs


def _derived_seed(master: int, inputs: dict) -> int:
    """31-bit seed from the master seed and the candidate's seed-free inputs."""
    h = hashlib.sha256(f"{master}|{_sha(_identity(inputs))}".encode()).digest()
    return int.from_bytes(h[:4], "big") & 0x7FFFFFFF


def _with_strain(spec: str, eps: float, mode: str) -> str:
    if eps == 0:
        return spec
    return f"{spec} {'strain' if mode == 'uniform' else 'biaxial'}={eps:.6g}"


def _method_settings(opts: dict) -> dict:
    m = opts["method"]
    if m == "kmesh":
        return dict(opts["kmesh"])
    if m == "kpm":
        return dict(opts["kpm"])
    return dict(opts["cpa"])


def _expand(ctx: _Ctx, data: dict, base_dir: Path, master: int) -> list[Candidate]:
    defaults = _merge(_BUILTIN_DEFAULTS, data.get("defaults", {}))
    params_cache: dict[str, dict] = {}
    out: list[Candidate] = []
    seen: dict[str, tuple] = {}
    for si, system in enumerate(data["system"]):
        where = ("system", si)
        opts = _merge(defaults, system)
        p_where = where + ("params",) if "params" in system else ("defaults", "params")
        if opts["params"] not in params_cache:
            params_cache[opts["params"]] = _params_record(ctx, p_where, opts["params"], base_dir)
        params = params_cache[opts["params"]]
        name = system.get("name") or "".join(system.get("elements", [])) or f"system{si}"
        _string(ctx, where + ("name",), name)
        points = _grid(ctx, where, system)
        structures = _list(ctx, where + ("structures",), system.get("structures"), 1)
        pure = system.get("pure")
        if pure is not None:
            _string(ctx, where + ("pure",), pure)
        for ti, template in enumerate(structures):
            t_where = where + ("structures", ti)
            _string(ctx, t_where, template)
            for comp in (points if points is not None else [None]):
                if comp is None:
                    values, tmpl, tw = {}, template, t_where
                else:
                    present = {e: x for e, x in comp.items() if x > 0}
                    els = list(comp)
                    values = {"composition": "".join(f"{e}{_format_fraction(x)}"
                                                     for e, x in present.items()),
                              "element": max(present, key=present.get)}
                    values.update({k: e for k, e in zip("ABC", els, strict=False)})
                    tmpl, tw = template, t_where
                    if len(present) == 1:
                        if pure is None:
                            continue  # one-element points need a 'pure' template
                        tmpl, tw = pure, where + ("pure",)
                for eps in opts["strains"]:
                    base = {
                        "system": name,
                        "template": template,
                        "used_template": tmpl,
                        "composition": comp,
                        "elements": list(comp) if comp is not None else None,
                        "strain": float(eps),
                        "strain_mode": opts["strain_mode"],
                        "params": params,
                        "method": opts["method"],
                        "settings": _method_settings(opts),
                        "descriptors": list(dict.fromkeys(opts["descriptors"])),
                        "window": opts["window"],
                        "spectra": list(opts["spectra"]),
                        "spectrum_fwhm": float(opts["spectrum_fwhm"]),
                        "temperature": float(opts["temperature"]),
                    }
                    seed = _derived_seed(master, base)
                    spec = _with_strain(_fill(ctx, tw, tmpl, {**values, "seed": seed}),
                                        float(eps), opts["strain_mode"])
                    _check_spec(ctx, tw, spec)
                    inputs = {**base, "structure": spec, "seed": seed}
                    key = _sha(_identity(inputs))[:20]
                    if key in seen:
                        continue  # the same calculation listed twice is run once
                    seen[key] = tw
                    out.append(Candidate(len(out), key, inputs))
    return out


def _check_spec(ctx, where, spec: str) -> None:
    """Grammar check of a structure spec without building it."""
    from valband.structure.build import parse_build_spec
    from valband.structure.specs import parse_spec

    try:
        parsed = parse_spec(spec)
        if parsed.kind == "bulk":
            parse_build_spec(" ".join(parsed.words))
    except ValbandError as exc:
        raise ctx.fail(where, str(exc)) from None


# ------------------------------------------------------------------------------ entry
def parse_campaign(text: str, path: str = "<campaign>", base_dir: Path | None = None) -> Campaign:
    """Validate campaign TOML text and expand it (see :func:`load_campaign`)."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"campaign {path}: not valid TOML: {exc}") from None
    ctx = _Ctx(path, text)
    ctx.data = data
    _check_keys(ctx, (), data, _TOP_KEYS)
    if "schema" not in data:
        raise ctx.fail(("schema",), f"missing; write 'schema = {CAMPAIGN_SCHEMA}' at the top")
    if data["schema"] != CAMPAIGN_SCHEMA or isinstance(data["schema"], bool):
        raise ctx.fail(("schema",), f"{data['schema']!r}; this valband reads campaign schema "
                       f"{CAMPAIGN_SCHEMA}")
    camp = data.get("campaign")
    if not isinstance(camp, dict):
        raise ctx.fail(("campaign",), "the [campaign] table (with at least name = ...) is missing")
    _check_keys(ctx, ("campaign",), camp, _CAMPAIGN_KEYS)
    if "name" not in camp:
        raise ctx.fail(("campaign", "name"), "missing; give the campaign a name")
    name = _string(ctx, ("campaign", "name"), camp["name"])
    seed = _number(ctx, ("campaign", "seed"), camp.get("seed", 0), 0, 2**63 - 1,
                   "a non-negative integer", integer=True)
    scheduler = camp.get("scheduler")
    if scheduler is not None:
        _string(ctx, ("campaign", "scheduler"), scheduler)
    workers = camp.get("workers")
    if workers is not None:
        _number(ctx, ("campaign", "workers"), workers, 0, 4096, "a worker count", integer=True)
    description = camp.get("description", "")
    if not isinstance(description, str):
        raise ctx.fail(("campaign", "description"), "must be a string")
    defaults = data.get("defaults", {})
    if not isinstance(defaults, dict):
        raise ctx.fail(("defaults",), "must be a table")
    _check_keys(ctx, ("defaults",), defaults, _OPTION_KEYS)
    _check_options(ctx, ("defaults",), defaults)
    systems = data.get("system")
    if not isinstance(systems, list) or not systems:
        raise ctx.fail(("system",), "no [[system]] tables; a campaign needs at least one")
    for si, system in enumerate(systems):
        _check_keys(ctx, ("system", si), system, _SYSTEM_KEYS)
        _check_options(ctx, ("system", si), system)
        if "structures" not in system:
            raise ctx.fail(("system", si, "structures"), "missing; list at least one structure "
                           "spec (template)")
    base = base_dir if base_dir is not None else Path(".")
    candidates = _expand(ctx, data, base, int(seed))
    if not candidates:
        raise ctx.fail(("system",), "the systems expand to no candidate (one-element grid "
                       "points need a 'pure' template)")
    fingerprint = _sha({"campaign_schema": CAMPAIGN_SCHEMA,
                        "candidates": sorted(c.key for c in candidates)})[:32]
    return Campaign(path=path, name=name, description=description, seed=int(seed),
                    scheduler=scheduler, workers=workers, candidates=tuple(candidates),
                    fingerprint=fingerprint, systems=tuple(systems))


def load_campaign(path: str | Path) -> Campaign:
    """Read a campaign file, validate it and expand its candidates.

    Raises
    ------
    InputError
        Missing or unreadable file, TOML syntax (line and column from tomllib), unknown or
        malformed keys (line and dotted key named), structure specs that do not parse,
        parameter sets that cannot be loaded.
    """
    p = Path(path)
    if not p.is_file():
        raise InputError(f"campaign {p}: no such file (a TOML campaign file is expected)")
    try:
        text = p.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"campaign {p}: cannot be read ({exc})") from None
    return parse_campaign(text, str(p), p.resolve().parent)
