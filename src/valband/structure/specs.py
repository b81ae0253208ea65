"""Extended structure specs: one line of text for bulk, ordered, random, SQS, slab, overlayer.

Grammar (whitespace-separated tokens; ``KEY=VALUE`` options in any order after the words)::

    ordered    FORMULA ORDER [A] [c/a=R]              ORDER: L12 (A3B), L10 (AB), B2 (AB)
    random     random COMPOSITION LATTICE SIZE [A] [c=C] seed=S
    sqs        sqs COMPOSITION LATTICE SIZE [A] [c=C] seed=S [shells=N] [steps=M]
    slab       slab ELEMENT FACET [A] [c=C] layers=N [vacuum=V] [size=N1xN2]
    overlayer  overlayer A/B FACET [A] [c=C] layers=N [ml=K] [vacuum=V] [size=N1xN2]
               [nu=NU] [a_over=A2]
    bulk       anything else: the bulk grammar of valband.structure.build
               (ELEMENT[S] LATTICE [A] [c=C], e.g. 'Cu fcc 3.61')

and, after any form, at most one strain::

    strain=E                         uniform: every length × (1 + E)
    biaxial=E [axis=x|y|z] [relax=NU] in-plane strain ⟂ axis (default z, the slab normal),
                                     optionally Poisson-relaxed along the axis with ν = NU

Words
    FORMULA      ``Cu3Pd`` or ``CuPd3`` for L12 (the element with 3 is the majority), ``CuAu``
                 for L10 and B2.
    COMPOSITION  fractions ``Cu0.75Pd0.25`` (must sum to 1) or whole ratios ``Cu3Pd``.
    LATTICE      fcc, bcc, hcp, sc.
    SIZE         ``2x2x2`` (repeats of the primitive cell) or ``32`` (32 sites in the most
                 compact supercell, :func:`valband.structure.alloys.compact_supercell_matrix`).
    FACET        fcc111, fcc100, fcc110, bcc110, bcc100, hcp0001.
    A, C, A2     lattice constants in Å (default: ASE reference values, Vegard's law for
                 alloys; see :mod:`valband.structure.alloys`). For an overlayer A is the
                 substrate's and ``a_over`` the overlayer's bulk constant.
    A/B          overlayer element A on substrate B; ``ml`` layers of A (default 1); ``nu``
                 switches the A spacings to the elastic estimate (:mod:`.surfaces`).

Examples (of our own invention)::

    Cu3Pd L12
    CuPd B2 2.99
    CuAu L10 3.96 c/a=0.93
    random Cu0.75Pd0.25 fcc 2x2x2 seed=7
    sqs Cu0.5Pd0.5 fcc 32 seed=1
    slab Pt fcc111 layers=5 vacuum=12
    overlayer Pd/Cu fcc111 layers=5 biaxial=-0.02
    Cu fcc 3.61 strain=0.01
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

import numpy as np

from valband.errors import StructureError
from valband.structure.alloys import (
    ALLOY_LATTICES,
    b2,
    compact_supercell_matrix,
    l10,
    l12,
    normalise_composition,
    random_alloy,
    supercell_matrix,
    vegard_lattice_constant,
)
from valband.structure.build import build_structure
from valband.structure.record import Structure
from valband.structure.sqs import sqs
from valband.structure.strain import apply_strain, biaxial_strain_tensor, strain_tensor
from valband.structure.surfaces import FACETS, SlabInfo, overlayer, slab

__all__ = ["FORMS", "ParsedSpec", "build_from_spec", "parse_spec"]

#: Usage line of each form, quoted in error messages.
FORMS = {
    "ordered": "FORMULA ORDER [A] [c/a=R] with ORDER one of L12, L10, B2 (e.g. 'Cu3Pd L12')",
    "random": "random COMPOSITION LATTICE SIZE [A] [c=C] seed=S "
    "(e.g. 'random Cu0.75Pd0.25 fcc 2x2x2 seed=7')",
    "sqs": "sqs COMPOSITION LATTICE SIZE [A] [c=C] seed=S [shells=N] [steps=M] "
    "(e.g. 'sqs Cu0.5Pd0.5 fcc 32 seed=1')",
    "slab": "slab ELEMENT FACET [A] [c=C] layers=N [vacuum=V] [size=N1xN2] "
    "(e.g. 'slab Pt fcc111 layers=5 vacuum=12')",
    "overlayer": "overlayer A/B FACET [A] [c=C] layers=N [ml=K] [vacuum=V] [size=N1xN2] "
    "[nu=NU] [a_over=A2] (e.g. 'overlayer Pd/Cu fcc111 layers=5')",
    "bulk": "ELEMENT[S] LATTICE [A] [c=C] (e.g. 'Cu fcc 3.61')",
}
_STRAIN_USAGE = "strain=E or biaxial=E [axis=x|y|z] [relax=NU] after any form"
_STRAIN_KEYS = ("strain", "biaxial", "axis", "relax")
_KEYS = {
    "ordered": ("c/a",),
    "random": ("c", "seed"),
    "sqs": ("c", "seed", "shells", "steps"),
    "slab": ("c", "layers", "vacuum", "size"),
    "overlayer": ("c", "layers", "ml", "vacuum", "size", "nu", "a_over"),
}
_ORDERS = {"L12": "L12", "L1_2": "L12", "L10": "L10", "L1_0": "L10", "B2": "B2"}
_FORMULA_RE = re.compile(r"([A-Z][a-z]?)(\d+(?:\.\d*)?|\.\d+)?")
_LATTICES = ALLOY_LATTICES


@dataclass(frozen=True)
class ParsedSpec:
    """A spec split into its form, positional words and ``KEY=VALUE`` options (strings)."""

    text: str
    kind: str
    words: tuple[str, ...]
    options: dict[str, str] = field(default_factory=dict)
    strain: dict[str, str] = field(default_factory=dict)


def _fail(text: str, kind: str | None, problem: str) -> StructureError:
    if kind is None:
        forms = "; ".join(FORMS.values())
        usage = f"spec forms: {forms}; plus {_STRAIN_USAGE}"
    else:
        usage = f"usage: {FORMS[kind]}; plus {_STRAIN_USAGE}"
    return StructureError(f"structure spec {text!r}: {problem}; {usage}")


def parse_spec(text: str) -> ParsedSpec:
    """Split a spec into form, words and options; raise naming the first bad token."""
    if not isinstance(text, str) or not text.split():
        raise _fail(str(text), None, "the spec is empty")
    tokens = text.split()
    head = tokens[0].lower()
    if head in ("random", "sqs", "slab", "overlayer"):
        kind, body = head, tokens[1:]
    elif len(tokens) >= 2 and tokens[1].upper() in _ORDERS:
        kind, body = "ordered", tokens
    else:
        kind, body = "bulk", tokens
    words, options, strain_opts = [], {}, {}
    for tok in body:
        key, eq, value = tok.partition("=")
        if not eq:
            if options or strain_opts:
                raise _fail(text, kind, f"{tok!r} follows the options; put words first")
            words.append(tok)
            continue
        key = key.lower()
        if not value:
            raise _fail(text, kind, f"option {tok!r} has no value")
        if key in _STRAIN_KEYS:
            target = strain_opts
        elif kind == "bulk" and key == "c":
            words.append(tok)  # the bulk grammar's own option, passed through untouched
            continue
        elif key in _KEYS.get(kind, ()):
            target = options
        else:
            keys = ", ".join(_KEYS.get(kind, ("c",)) + _STRAIN_KEYS)
            raise _fail(text, kind, f"unknown option {key!r} (options here: {keys})")
        if key in target:
            raise _fail(text, kind, f"option {key!r} is given twice")
        target[key] = value
    if "strain" in strain_opts and "biaxial" in strain_opts:
        raise _fail(text, kind, "give either strain= or biaxial=, not both")
    for k in ("axis", "relax"):
        if k in strain_opts and "biaxial" not in strain_opts:
            raise _fail(text, kind, f"option {k!r} needs biaxial=E")
    return ParsedSpec(text, kind, tuple(words), options, strain_opts)


# --------------------------------------------------------------------------------------------
# small parsers
# --------------------------------------------------------------------------------------------
def _number(spec: ParsedSpec, token: str, what: str) -> float:
    try:
        v = float(token)
    except ValueError:
        raise _fail(spec.text, spec.kind, f"{token!r} is not a number ({what})") from None
    if not np.isfinite(v):
        raise _fail(spec.text, spec.kind, f"{token!r} is not finite ({what})")
    return v


def _integer(spec: ParsedSpec, token: str, what: str, minimum: int = 1) -> int:
    if not re.fullmatch(r"\d+", token) or int(token) < minimum:
        raise _fail(spec.text, spec.kind, f"{token!r} is not an integer ≥ {minimum} ({what})")
    return int(token)


def _formula(spec: ParsedSpec, token: str, what: str) -> dict[str, float]:
    """``Cu3Pd`` / ``Cu0.75Pd0.25`` → ordered dict element → amount."""
    from ase.data import atomic_numbers

    pos, out = 0, {}
    for m in _FORMULA_RE.finditer(token):
        if m.start() != pos:
            break
        el, amount = m.group(1), m.group(2)
        if el not in atomic_numbers or el == "X" or el in out:
            raise _fail(spec.text, spec.kind, f"{token!r}: bad or repeated element {el!r} ({what})")
        out[el] = 1.0 if amount is None else float(amount)
        pos = m.end()
    if pos != len(token) or not out:
        raise _fail(spec.text, spec.kind, f"{token!r} is not a {what} such as 'Cu0.75Pd0.25'")
    return out


def _composition(spec: ParsedSpec, token: str) -> dict[str, float]:
    amounts = _formula(spec, token, "composition")
    if len(amounts) < 2:
        raise _fail(spec.text, spec.kind, f"{token!r}: an alloy needs at least two elements")
    values = list(amounts.values())
    if all(float(v).is_integer() for v in values) and sum(values) > 1:
        total = sum(values)  # whole ratios such as Cu3Pd
        amounts = {e: v / total for e, v in amounts.items()}
    try:
        return normalise_composition(amounts)
    except StructureError as exc:
        raise _fail(spec.text, spec.kind, f"{token!r}: {exc}") from None


def _size(spec: ParsedSpec, token: str, parent: Structure):
    """``2x2x2`` → repeats; ``32`` → compact supercell matrix with 32 sites."""
    if re.fullmatch(r"\d+", token):
        n = _integer(spec, token, "number of sites")
        try:
            return compact_supercell_matrix(parent, n)
        except StructureError as exc:
            raise _fail(spec.text, spec.kind, f"size {token!r}: {exc}") from None
    m = re.fullmatch(r"(\d+)x(\d+)x(\d+)", token.lower())
    if not m or min(int(g) for g in m.groups()) < 1:
        raise _fail(spec.text, spec.kind, f"{token!r} is not a size (N1xN2xN3 or a site count)")
    return tuple(int(g) for g in m.groups())


def _lattice_constant(spec: ParsedSpec, words: list[str], what: str) -> float | None:
    if not words:
        return None
    tok = words.pop(0)
    a = _number(spec, tok, f"lattice constant of {what} in Å")
    if not 0 < a < 100:
        raise _fail(spec.text, spec.kind, f"lattice constant {tok!r} Å is not in (0, 100)")
    return a


def _no_more(spec: ParsedSpec, words: list[str]) -> None:
    if words:
        raise _fail(spec.text, spec.kind, f"unexpected word {words[0]!r}")


def _need(spec: ParsedSpec, words: list[str], what: str) -> str:
    if not words:
        raise _fail(spec.text, spec.kind, f"{what} is missing")
    return words.pop(0)


def _groups_by_element(st: Structure) -> dict[str, list[int]]:
    return {e: [i for i, s in enumerate(st.symbols) if s == e] for e in st.elements}


# --------------------------------------------------------------------------------------------
# builders per form
# --------------------------------------------------------------------------------------------
def _build_ordered(spec: ParsedSpec, info: dict) -> Structure:
    words = list(spec.words)
    formula_tok = words.pop(0)
    order = _ORDERS[words.pop(0).upper()]
    a = _lattice_constant(spec, words, order)
    _no_more(spec, words)
    amounts = _formula(spec, formula_tok, "formula")
    els = list(amounts)
    ratio = [amounts[e] for e in els]
    if len(els) != 2:
        raise _fail(spec.text, spec.kind, f"{formula_tok!r}: {order} needs two elements")
    if "c/a" in spec.options and order != "L10":
        raise _fail(spec.text, spec.kind, f"option 'c/a' applies to L10 only, not {order}")
    if order == "L12":
        if sorted(ratio) != [1.0, 3.0]:
            raise _fail(spec.text, spec.kind, f"{formula_tok!r}: L12 is A3B, e.g. Cu3Pd or CuPd3")
        major, minor = (els[0], els[1]) if ratio[0] == 3 else (els[1], els[0])
        st = l12(major, minor, a)
    else:
        if ratio != [1.0, 1.0]:
            raise _fail(spec.text, spec.kind, f"{formula_tok!r}: {order} is AB, e.g. CuAu")
        if order == "L10":
            ca = 1.0
            if "c/a" in spec.options:
                ca = _number(spec, spec.options["c/a"], "c/a")
            st = l10(els[0], els[1], a, ca)
            info["c_over_a"] = ca
        else:
            st = b2(els[0], els[1], a)
    info.update(order=order, groups=_groups_by_element(st))
    return st


def _parent(spec: ParsedSpec, comp: dict[str, float], lattice: str, a, c) -> Structure:
    from ase.build import bulk

    va, vc = vegard_lattice_constant(comp, lattice)
    a = va if a is None else a
    kwargs = {"a": a}
    if lattice == "hcp":
        kwargs["c"] = (vc / va * a) if c is None else c
    elif c is not None:
        raise _fail(spec.text, spec.kind, "option 'c' applies to hcp only")
    first = next(iter(comp))
    atoms = bulk(first, lattice, **kwargs)
    desc = f"{lattice} a={a:.6g}" + (f" c={kwargs['c']:.6g}" if lattice == "hcp" else "")
    return Structure.from_atoms(atoms, source=desc)


def _alloy_words(spec: ParsedSpec):
    words = list(spec.words)
    comp = _composition(spec, _need(spec, words, "COMPOSITION (e.g. Cu0.75Pd0.25)"))
    lattice = _need(spec, words, "LATTICE (fcc, bcc, hcp, sc)").lower()
    if lattice not in _LATTICES:
        raise _fail(spec.text, spec.kind, f"unknown lattice {lattice!r} ({', '.join(_LATTICES)})")
    size_tok = _need(spec, words, "SIZE (e.g. 2x2x2 or 32)")
    a = _lattice_constant(spec, words, "the alloy")
    _no_more(spec, words)
    c = None
    if "c" in spec.options:
        c = _number(spec, spec.options["c"], "c in Å")
    if "seed" not in spec.options:
        raise _fail(spec.text, spec.kind, "seed=S is missing (every random structure has a seed)")
    seed = _integer(spec, spec.options["seed"], "seed", minimum=0)
    try:
        parent = _parent(spec, comp, lattice, a, c)
    except StructureError as exc:
        raise _fail(spec.text, spec.kind, str(exc)) from None
    return comp, parent, _size(spec, size_tok, parent), seed


def _build_random(spec: ParsedSpec, info: dict) -> Structure:
    comp, parent, size, seed = _alloy_words(spec)
    st = random_alloy(parent, comp, size, seed=seed)
    info.update(
        seed=seed,
        composition=comp,
        counts={e: st.symbols.count(e) for e in comp},
        supercell=supercell_matrix(size).tolist(),
        parent=parent.source,
        groups=_groups_by_element(st),
    )
    return st


def _build_sqs(spec: ParsedSpec, info: dict) -> Structure:
    comp, parent, size, seed = _alloy_words(spec)
    kwargs = {}
    if "shells" in spec.options:
        kwargs["n_shells"] = _integer(spec, spec.options["shells"], "number of shells")
    if "steps" in spec.options:
        kwargs["n_steps"] = _integer(spec, spec.options["steps"], "annealing steps", 0)
    res = sqs(parent, comp, size, seed=seed, **kwargs)
    st = res.structure
    info.update(
        seed=seed,
        composition=comp,
        counts={e: st.symbols.count(e) for e in comp},
        supercell=supercell_matrix(size).tolist(),
        parent=parent.source,
        groups=_groups_by_element(st),
        sqs=res.to_dict(),
    )
    return st


def _slab_options(spec: ParsedSpec) -> dict:
    opts = spec.options
    out = {}
    if "layers" not in opts:
        raise _fail(spec.text, spec.kind, "layers=N is missing")
    out["layers"] = _integer(spec, opts["layers"], "number of layers")
    if "vacuum" in opts:
        out["vacuum"] = _number(spec, opts["vacuum"], "vacuum in Å")
    if "size" in opts:
        m = re.fullmatch(r"(\d+)x(\d+)", opts["size"].lower())
        if not m or min(int(g) for g in m.groups()) < 1:
            raise _fail(spec.text, spec.kind, f"size={opts['size']!r} is not N1xN2")
        out["size"] = (int(m.group(1)), int(m.group(2)))
    if "c" in opts:
        out["c"] = _number(spec, opts["c"], "c in Å")
    return out


def _facet_word(spec: ParsedSpec, words: list[str]) -> str:
    tok = _need(spec, words, "FACET")
    if tok.lower() not in FACETS:
        raise _fail(
            spec.text, spec.kind, f"unknown facet {tok!r} ({', '.join(FACETS)})"
        )
    return tok.lower()


def _slab_info(info: dict, si: SlabInfo) -> None:
    d = si.to_dict()
    info.update(
        facet=d["facet"],
        layers=d["layer"],
        depth=d["depth"],
        layer_z=d["layer_z"],
        vacuum=d["vacuum"],
        groups=d["groups"],
        slab=d,
    )


def _build_slab(spec: ParsedSpec, info: dict) -> Structure:
    words = list(spec.words)
    element = _need(spec, words, "ELEMENT")
    facet = _facet_word(spec, words)
    a = _lattice_constant(spec, words, element)
    _no_more(spec, words)
    opts = _slab_options(spec)
    try:
        st, si = slab(element, facet, a=a, **opts)
    except StructureError as exc:
        raise _fail(spec.text, spec.kind, str(exc)) from None
    info["_slab"] = si
    return st


def _build_overlayer(spec: ParsedSpec, info: dict) -> Structure:
    words = list(spec.words)
    pair = _need(spec, words, "A/B (overlayer/substrate)")
    m = re.fullmatch(r"([A-Z][a-z]?)/([A-Z][a-z]?)", pair)
    if not m:
        raise _fail(spec.text, spec.kind, f"{pair!r} is not A/B such as 'Pd/Cu'")
    facet = _facet_word(spec, words)
    a = _lattice_constant(spec, words, "the substrate")
    _no_more(spec, words)
    opts = _slab_options(spec)
    if "ml" in spec.options:
        opts["over_layers"] = _integer(spec, spec.options["ml"], "overlayer layers")
    if "nu" in spec.options:
        opts["poisson"] = _number(spec, spec.options["nu"], "Poisson's ratio")
    if "a_over" in spec.options:
        opts["a_over"] = _number(spec, spec.options["a_over"], "overlayer lattice constant")
    try:
        st, si = overlayer(m.group(1), m.group(2), facet, a=a, **opts)
    except StructureError as exc:
        raise _fail(spec.text, spec.kind, str(exc)) from None
    info["_slab"] = si
    return st


def _build_bulk(spec: ParsedSpec, info: dict) -> Structure:
    text = " ".join(spec.words)
    try:
        return build_structure(text)
    except StructureError as exc:
        raise StructureError(
            f"{exc} (extended forms also accepted: {'; '.join(FORMS.values())}; "
            f"plus {_STRAIN_USAGE})"
        ) from None


_BUILDERS = {
    "ordered": _build_ordered,
    "random": _build_random,
    "sqs": _build_sqs,
    "slab": _build_slab,
    "overlayer": _build_overlayer,
    "bulk": _build_bulk,
}


def _apply_strain(spec: ParsedSpec, st: Structure, info: dict) -> Structure:
    opts = spec.strain
    if "strain" in opts:
        eps = _number(spec, opts["strain"], "uniform strain")
        axis = nu = None
    else:
        eps = _number(spec, opts["biaxial"], "biaxial strain")
        axis = opts.get("axis", "z").lower()
        nu = _number(spec, opts["relax"], "Poisson's ratio") if "relax" in opts else None
    try:
        out = apply_strain(st, eps, axis=axis, poisson=nu)
        if axis is None:
            tensor = strain_tensor(eps)
        else:
            tensor = biaxial_strain_tensor(eps, axis, nu)
    except StructureError as exc:
        raise _fail(spec.text, spec.kind, str(exc)) from None
    info["strain"] = tensor.tolist()
    return out


def build_from_spec(text: str) -> tuple[Structure, dict]:
    """Build the structure a spec describes (grammar: module docstring).

    Returns
    -------
    (Structure, dict)
        The info dict (JSON-ready) always has ``spec``, ``kind`` (ordered, random, sqs, slab,
        overlayer, bulk), ``formula``, ``n_sites``, ``seed`` (None unless random/sqs),
        ``strain`` (3×3 list or None) and ``groups`` (site indices by element, or by layer
        and role for slabs). Random and SQS add ``composition``, ``counts``, ``supercell``,
        ``parent`` (and ``sqs``: correlations per shell, objective, steps). Slabs add
        ``facet``, ``layers`` (per site, 0 = top), ``depth``, ``layer_z`` (Å, top first),
        ``vacuum`` (Å) and ``slab`` (the full :class:`~valband.structure.SlabInfo`
        as a dict). L1_0 adds ``c_over_a``; ordered forms add ``order``.
    """
    spec = parse_spec(text)
    info: dict = {"spec": spec.text, "kind": spec.kind, "seed": None, "strain": None}
    st = _BUILDERS[spec.kind](spec, info)
    if spec.strain:
        st = _apply_strain(spec, st, info)
    slab_info = info.pop("_slab", None)
    if slab_info is not None:
        _slab_info(info, slab_info.with_structure(st) if spec.strain else slab_info)
    info.setdefault("groups", _groups_by_element(st))
    info.update(formula=st.formula, n_sites=st.n_sites)
    return st, info
