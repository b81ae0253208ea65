"""d-band centre shifts of alloy components, overlayers, subsurface alloys and strained surfaces.

The quantities a catalysis user reads off a model (Hammer & Nørskov's d-band picture; Ruban,
Hammer, Stoltze, Skriver & Nørskov, J. Mol. Catal. A 115, 421 (1997)) are *differences* of
d-band centres, each against a stated reference:

``alloy``        a component in an ordered or random alloy minus the same element's bulk metal;
``overlayer``    a pseudomorphic overlayer minus the surface layer of the overlayer metal's own
                 slab (same facet and thickness);
``subsurface``   the surface layer of a slab with substituted subsurface layers (e.g.
                 Pt–Ni–Pt(111), :func:`valband.structure.substitution.substitute_layers`)
                 minus the surface layer of the host slab;
``strain``       d(centre of the surface layer)/d(biaxial in-plane strain), eV per 1 %;
``slab-centre``  the central layer of a pure slab minus the bulk metal (should vanish).

Centre = first moment of the group's d partial DOS per atom over the descriptor window
(:data:`valband.workflows.describe.DEFAULT_WINDOW`, eV relative to E_F).

Charge self-consistency
    :func:`trend_dos` runs the program's default entry
    (:func:`valband.workflows.methods.dos_by_method` with ``neutral="auto"``): local charge
    neutrality per site on every structure that is not a single element with all sites
    symmetry-equivalent; a pure bulk metal is computed as it is.

k-meshes
    :func:`mesh_for` gives n_i = max(1, round(density · |b_i| / 2π)) points along reciprocal
    vector b_i (``density`` in Å, default 50 puts 24 points on the primitive fcc Cu cell, the
    program's default mesh), and one point along the normal of a slab (no dispersion across
    the vacuum; common practice).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from valband.errors import InputError, SettingsError

__all__ = [
    "KINDS",
    "DEFAULT_DENSITY",
    "TrendCase",
    "TrendResult",
    "case_from_dict",
    "evaluate_case",
    "group_centre",
    "mesh_for",
    "needs_neutrality",
    "trend_dos",
]

#: Kinds of trend (module docstring).
KINDS = ("alloy", "overlayer", "subsurface", "strain", "slab-centre")
#: Default k-point density (Å): 24 points on the primitive fcc Cu cell.
DEFAULT_DENSITY = 50.0


# ------------------------------------------------------------------------------------------
# the charge-self-consistency rule and the DOS
# ------------------------------------------------------------------------------------------
def needs_neutrality(structure) -> bool:
    """Whether the program's default rule applies site neutrality (its ``neutral="auto"``)."""
    from valband.workflows.methods import neutrality_choice

    return neutrality_choice(structure, "auto")[0] is not None


def trend_dos(model, settings, params, neutral: bool | None = None):
    """DOS under the program's charge-self-consistency rule: ``(DOSResult, record)``.

    Parameters
    ----------
    model : TBModel
    settings : DOSSettings
    params : ParameterSet the model was built from (valence counts of the neutrality targets)
    neutral : None (the default rule, :func:`valband.workflows.methods.neutrality_choice`),
        True (site neutrality) or False (plain)

    Returns
    -------
    (DOSResult, dict)
        The record names the method (``"plain"`` or ``"site neutrality"``), iterations, the
        largest residual (electrons per site) and the site shifts (eV).
    """
    from valband.workflows.methods import dos_by_method

    choice = "auto" if neutral is None else ("site" if neutral else "off")
    dos, rec = dos_by_method(model, {"kind": "trend"}, settings, params=params, neutral=choice)
    neu = rec["neutrality"]
    if neu["mode"] is None:
        return dos, {"method": "plain"}
    report = rec["report"]
    return dos, {
        "method": "site neutrality",
        "iterations": neu["iterations"],
        "max_residual": neu["max_residual_per_site"],
        "final_mesh_max_residual": neu.get("final_mesh_max_residual_per_site"),
        "site_shifts_eV": [round(float(v), 5) for v in report["site_shifts_eV"]],
        "initial_max_residual": max(abs(v) for v in report["initial_residuals_per_site"].values()),
    }


def mesh_for(structure, density: float = DEFAULT_DENSITY, slab: bool = False
             ) -> tuple[int, int, int]:
    """k-mesh of about ``density`` Å · |b_i|/2π points per reciprocal vector (docstring)."""
    if not (math.isfinite(density) and density > 0):
        raise SettingsError(f"k-point density {density!r} Å: must be > 0")
    b = np.linalg.norm(structure.reciprocal_cell, axis=1) / (2.0 * np.pi)
    n = [max(1, int(round(density * x))) for x in b]
    if slab:
        n[2] = 1
    return (n[0], n[1], n[2])


def group_centre(dos, sites: Sequence[int], window=None) -> float:
    """d-band centre (eV rel. E_F) of the d pDOS per atom of ``sites`` over the window."""
    from valband.alloy.layers import layer_descriptors
    from valband.workflows.describe import DEFAULT_WINDOW

    if window is None:
        window = (max(float(dos.energies[0]), DEFAULT_WINDOW[0]),
                  min(float(dos.energies[-1]), DEFAULT_WINDOW[1]))
    return float(layer_descriptors(dos, {"g": list(sites)}, "d", window)["g"].centre)


# ------------------------------------------------------------------------------------------
# cases
# ------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class TrendCase:
    """One published trend and how to compute it (fields as in tests/data/dband_trends.toml).

    id : short name; kind : one of :data:`KINDS`; label : text for tables
    structure : spec of the structure (``host`` slab spec for ``subsurface``)
    group : ``"element:Pd"``, ``"overlayer"``, ``"surface"``, ``"centre"``
    reference : spec of the reference structure (bulk metal or clean slab; unused for strain)
    reference_group : group in the reference (``"element:Pd"``, ``"surface"``, ``"all"``)
    substitute : {"element", "layers"} for ``subsurface``
    strains : biaxial strains (fractions) for ``strain``
    published : the published value (eV; eV per % for strain), tolerance : ± (eV)
    source : citation; note : how the value is known (e.g. "from memory")
    ci_density : k-point density (Å) of the fast CI test where the default coarse one would
        change the verdict (None: the test's default)
    """

    id: str
    kind: str
    label: str
    structure: str
    group: str
    published: float
    tolerance: float
    source: str
    reference: str = ""
    reference_group: str = "all"
    substitute: Mapping[str, object] = field(default_factory=dict)
    strains: tuple[float, ...] = ()
    note: str = ""
    ci_density: float | None = None

    def agrees(self, value: float) -> bool:
        """Same sign as the published value (if it is not zero) and within the tolerance."""
        same_sign = self.published == 0 or np.sign(value) == np.sign(self.published)
        return bool(same_sign and abs(value - self.published) <= self.tolerance)


def case_from_dict(d: Mapping) -> TrendCase:
    """A :class:`TrendCase` from one table of the reference file; InputError names a bad key."""
    names = {f.name for f in dataclasses.fields(TrendCase)}
    extra = sorted(set(d) - names)
    if extra:
        raise InputError(f"trend case {d.get('id', '?')!r}: unknown key(s) {', '.join(extra)}; "
                         f"accepted {', '.join(sorted(names))}")
    try:
        case = TrendCase(**{**d, "strains": tuple(float(x) for x in d.get("strains", ()))})
    except TypeError as exc:
        raise InputError(f"trend case {d.get('id', '?')!r}: {exc}") from None
    if case.kind not in KINDS:
        raise InputError(f"trend case {case.id!r}: kind {case.kind!r}; accepted {', '.join(KINDS)}")
    if case.kind == "strain" and len(case.strains) < 2:
        raise InputError(f"trend case {case.id!r}: a strain trend needs ≥ 2 strains")
    if case.kind != "strain" and not case.reference:
        raise InputError(f"trend case {case.id!r}: needs a reference structure")
    return case


def _sites(group: str, structure, info: Mapping) -> list[int]:
    if group == "all":
        return list(range(structure.n_sites))
    if group.startswith("element:"):
        el = group.split(":", 1)[1]
        sites = [i for i, s in enumerate(structure.symbols) if s == el]
        if not sites:
            raise InputError(f"group {group!r}: no {el} in {structure.formula}")
        return sites
    slab = info.get("slab_info")
    if slab is None:
        raise InputError(f"group {group!r} needs a slab or overlayer structure")
    from valband.alloy.layers import resolve_groups

    groups = resolve_groups(slab, structure.n_sites)
    if group not in groups:
        raise InputError(f"group {group!r}: the slab has {', '.join(groups)}")
    return list(groups[group])


def _build(spec: str, substitute: Mapping | None = None):
    """Structure and info (with ``slab_info``: a SlabInfo for slabs) of a spec."""
    from valband.structure import build_from_spec
    from valband.structure.substitution import substitute_layers
    from valband.structure.surfaces import SlabInfo

    st, info = build_from_spec(spec)
    info = dict(info)
    if "slab" in info:
        d = info["slab"]
        si = SlabInfo(facet=d["facet"], n_layers=d["n_layers"],
                      layer=np.asarray(d["layer"], dtype=np.int64),
                      depth=np.asarray(d["depth"], dtype=np.int64),
                      layer_z=np.asarray(d["layer_z"], dtype=float), vacuum=d["vacuum"],
                      symmetric=d["symmetric"],
                      groups={k: tuple(v) for k, v in d["groups"].items()},
                      details=d["details"])  # fmt: skip
        if substitute:
            st, si = substitute_layers(st, si, substitute["layers"], str(substitute["element"]))
        info["slab_info"] = si
    elif substitute:
        raise InputError(f"substitution needs a slab spec, got {spec!r}")
    return st, info


@dataclass(frozen=True)
class TrendResult:
    """Model value(s) of one case: ``value`` under the rule, ``plain`` and ``neutral`` both.

    values are eV (eV per % for strain); ``details`` holds the centres behind each difference,
    meshes and the neutrality records.
    """

    case: TrendCase
    value: float
    plain: float
    neutral: float
    details: dict

    def to_dict(self) -> dict:
        """JSON-ready."""
        c = self.case
        return {"id": c.id, "kind": c.kind, "label": c.label, "published": c.published,
                "tolerance": c.tolerance, "source": c.source, "note": c.note,
                "model": self.value, "plain": self.plain, "neutral": self.neutral,
                "agrees": c.agrees(self.value), "agrees_plain": c.agrees(self.plain),
                "agrees_neutral": c.agrees(self.neutral), "details": self.details}


def _centres(spec, group, params, density, substitute=None):
    """Centre of ``group`` plain and under site neutrality (and which one the rule takes)."""
    from valband.tb import build_model
    from valband.workflows import DOSSettings

    st, info = _build(spec, substitute)
    is_slab = "slab_info" in info
    mesh = mesh_for(st, density, slab=is_slab)
    settings = DOSSettings(mesh=mesh)
    model = build_model(st, params)
    sites = _sites(group, st, info)
    out = {"spec": spec, "mesh": list(mesh), "sites": sites,
           "rule": "site neutrality" if needs_neutrality(st) else "plain"}
    dos, _ = trend_dos(model, settings, params, neutral=False)
    out["plain"] = group_centre(dos, sites)
    if needs_neutrality(st):
        dos, rec = trend_dos(model, settings, params, neutral=True)
        out["neutral"] = group_centre(dos, sites)
        out["neutrality"] = {k: rec[k] for k in ("iterations", "max_residual")}
    else:
        out["neutral"] = out["plain"]
    if substitute:
        out["substitute"] = dict(substitute)
    return out


def evaluate_case(case: TrendCase, params, density: float = DEFAULT_DENSITY) -> TrendResult:
    """Compute one case, plain and with site neutrality (the rule's choice is ``value``).

    Parameters
    ----------
    case : TrendCase
    params : a loaded ParameterSet
    density : k-point density (Å), :func:`mesh_for`
    """
    if case.kind == "strain":
        rows = []
        for eps in case.strains:
            spec = f"{case.structure} biaxial={eps:g}"
            rows.append(_centres(spec, case.group, params, density))
        x = 100.0 * np.array(case.strains)
        slopes = {k: float(np.polyfit(x, [r[k] for r in rows], 1)[0]) for k in ("plain", "neutral")}
        rule = rows[0]["rule"]
        value = slopes["neutral"] if rule != "plain" else slopes["plain"]
        return TrendResult(case, value, slopes["plain"], slopes["neutral"],
                           {"strain_percent": x.tolist(), "points": rows})
    sub = dict(case.substitute) if case.kind == "subsurface" else None
    a = _centres(case.structure, case.group, params, density, sub)
    b = _centres(case.reference, case.reference_group, params, density)
    plain = a["plain"] - b["plain"]
    neutral = a["neutral"] - b["neutral"]
    va = a["neutral"] if a["rule"] != "plain" else a["plain"]
    vb = b["neutral"] if b["rule"] != "plain" else b["plain"]
    return TrendResult(case, va - vb, plain, neutral, {"structure": a, "reference": b})
