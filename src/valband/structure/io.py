"""Read structure files through ASE, or build from a spec: one entry point, clear errors."""

from __future__ import annotations

from pathlib import Path

from valband.errors import StructureError
from valband.structure.record import Structure

__all__ = ["read_structure", "load_structure"]


def read_structure(path: str | Path, index: int = -1, format: str | None = None) -> Structure:
    """Read one frame of any file format ASE reads (CIF, POSCAR, extxyz, …).

    Raises :class:`StructureError` naming the file when it is missing, unreadable,
    or not a 3D-periodic crystal.
    """
    path = Path(path)
    if not path.exists():
        raise StructureError(f"{path}: no such structure file")
    if path.is_dir():
        raise StructureError(f"{path}: is a folder, not a structure file")
    import ase.io

    try:
        atoms = ase.io.read(str(path), index=index, format=format)
    except StopIteration:
        raise StructureError(f"{path}: the file holds no structure") from None
    except Exception as exc:  # ASE raises many types for malformed files
        raise StructureError(
            f"{path}: ASE could not read it as a structure ({type(exc).__name__}: {exc}); "
            "accepted: any format ASE reads (CIF, POSCAR/CONTCAR, extxyz, …), "
            "or a build spec such as 'Cu fcc 3.61'"
        ) from None
    if len(atoms) == 0:
        raise StructureError(f"{path}: the file holds no atoms")
    return Structure.from_atoms(atoms, source=str(path))


def load_structure(text: str | Path) -> Structure:
    """Read a structure from a file path or build it from a spec, whichever ``text`` is.

    Specs: the bulk grammar (``"Pd fcc"``) and the extended forms of
    :mod:`valband.structure.specs` (ordered, random, SQS, slab, overlayer, strain).
    """
    return load_structure_with_info(text)[0]


def load_structure_with_info(text: str | Path) -> tuple[Structure, dict]:
    """Like :func:`load_structure`, plus the spec's info (layers, groups, seed; kind "file")."""
    from valband.structure.specs import build_from_spec

    p = Path(text)
    if p.exists():
        return read_structure(p), {"kind": "file", "path": str(p)}
    tokens = str(text).split()
    if len(tokens) == 1 and (p.suffix or "/" in str(text)):
        raise StructureError(
            f"{text!r}: neither an existing structure file (no such file) nor a build spec; "
            "accepted: a file ASE reads, or a spec such as "
            "'Cu fcc 3.61', 'Cu3Pd L12' or 'slab Pt fcc111 layers=5'"
        )
    if len(tokens) < 2:
        raise StructureError(
            f"{text!r}: neither an existing structure file nor a build spec; "
            "accepted: a file ASE reads, or 'ELEMENT LATTICE [a]' such as 'Cu fcc 3.61'"
        )
    try:
        return build_from_spec(str(text))
    except StructureError as exc:
        raise StructureError(f"{text!r} is neither an existing structure file nor a build spec "
                             f"that valband understands: {exc}") from None
