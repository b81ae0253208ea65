"""Build bulk cells from a short text spec such as ``"Cu fcc"``, ``"Cu fcc 3.61"`` or ``"CuAu:L1_0"``.

Spec grammar (whitespace separated)::

    ELEMENT[S] LATTICE [A] [c=C]

``LATTICE`` is one of fcc, bcc, hcp, sc, diamond; ``A`` (Å) defaults to ASE's reference
lattice constant of the (first) element (``ase.data.reference_states``). Two elements on a
two-site lattice (``CuZn bcc`` → CsCl/B2 order, ``NaCl``-type is not offered) use ASE's
``bulk`` crystal structures where ASE has them.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from valband.errors import StructureError
from valband.structure.record import Structure

__all__ = ["BuildSpec", "parse_build_spec", "build_structure", "LATTICES"]

LATTICES = ("fcc", "bcc", "hcp", "sc", "diamond")

_ELEMENTS_RE = re.compile(r"^([A-Z][a-z]?)([A-Z][a-z]?)?$")


@dataclass(frozen=True)
class BuildSpec:
    """A parsed build spec: elements, lattice, lattice constant (Å or None), c (Å or None)."""

    elements: tuple[str, ...]
    lattice: str
    a: float | None = None
    c: float | None = None

    def __str__(self) -> str:
        parts = ["".join(self.elements), self.lattice]
        if self.a is not None:
            parts.append(f"{self.a:g}")
        if self.c is not None:
            parts.append(f"c={self.c:g}")
        return " ".join(parts)


def parse_build_spec(text: str) -> BuildSpec:
    """Parse ``"Cu fcc 3.61"``-style text; raise :class:`StructureError` naming the bad token."""
    tokens = text.split()
    accepted = "accepted: 'ELEMENT LATTICE [a] [c=C]', LATTICE one of " + ", ".join(LATTICES)
    if len(tokens) < 2:
        raise StructureError(f"build spec {text!r}: need an element and a lattice; {accepted}")
    m = _ELEMENTS_RE.match(tokens[0])
    if not m:
        raise StructureError(
            f"build spec {text!r}: {tokens[0]!r} is not one or two chemical symbols; {accepted}"
        )
    elements = tuple(e for e in m.groups() if e)
    lattice = tokens[1].lower()
    if lattice not in LATTICES:
        raise StructureError(f"build spec {text!r}: unknown lattice {tokens[1]!r}; {accepted}")
    a = c = None
    for tok in tokens[2:]:
        key, _, val = tok.partition("=")
        if _ and key != "c":
            raise StructureError(f"build spec {text!r}: unknown option {key!r}; {accepted}")
        if (c if _ else a) is not None:
            raise StructureError(
                f"build spec {text!r}: {'c' if _ else 'the lattice constant a'} is given twice "
                f"({tok!r}); give a once and, for hcp, c as c=C; {accepted}")
        try:
            if _:
                c = float(val)
            else:
                a = float(tok)
        except ValueError:
            raise StructureError(
                f"build spec {text!r}: {tok!r} is not a number (lattice constant in Å)"
            ) from None
    if c is not None and lattice != "hcp":
        raise StructureError(f"build spec {text!r}: c={c:g} applies to hcp only; {lattice} is "
                             "cubic (one lattice constant a)")
    for name, v in (("a", a), ("c", c)):
        if v is not None and not (v > 0 and v < 100):
            raise StructureError(f"build spec {text!r}: lattice constant {name}={v} Å is not in (0, 100)")
    return BuildSpec(elements, lattice, a, c)


def build_structure(spec: str | BuildSpec) -> Structure:
    """Build a bulk cell (primitive cell for one element; two-site cubic cell for two)."""
    if isinstance(spec, str):
        spec = parse_build_spec(spec)
    from ase.build import bulk
    from ase.data import atomic_numbers, reference_states

    for e in spec.elements:
        if e not in atomic_numbers:
            raise StructureError(f"build spec {spec}: unknown element {e!r}")
    a = spec.a
    if a is None:
        ref = reference_states[atomic_numbers[spec.elements[0]]]
        if not ref or ref.get("symmetry") != spec.lattice or "a" not in ref:
            raise StructureError(
                f"build spec {spec}: ASE has no reference {spec.lattice} lattice constant for "
                f"{spec.elements[0]} (its reference state is {ref and ref.get('symmetry')}); "
                "give the lattice constant in Å, e.g. 'Cu fcc 3.61'"
            )
        a = float(ref["a"])
    try:
        if len(spec.elements) == 1:
            kwargs = {"a": a}
            if spec.lattice == "hcp" and spec.c is not None:
                kwargs["c"] = spec.c
            atoms = bulk(spec.elements[0], spec.lattice, **kwargs)
        else:
            two_site = {"bcc": "cesiumchloride", "diamond": "zincblende", "fcc": "rocksalt"}
            if spec.lattice not in two_site:
                raise StructureError(
                    f"build spec {spec}: two elements are built on bcc (B2), fcc (rocksalt) "
                    "or diamond (zincblende); use a structure file for other orderings"
                )
            atoms = bulk("".join(spec.elements), two_site[spec.lattice], a=a)
    except (ValueError, KeyError, RuntimeError) as exc:
        raise StructureError(f"build spec {spec}: ASE could not build it: {exc}") from None
    return Structure.from_atoms(atoms, source=f"build:{spec}")
