"""Read structure files through ASE, or build from a spec: one entry point, clear errors."""

from __future__ import annotations

from pathlib import Path

from valband.errors import StructureError
from valband.structure.build import LATTICES, build_structure
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
    """A structure from a file path or a build spec (``"Pd fcc"``), whichever ``text`` is."""
    p = Path(text)
    if p.exists():
        return read_structure(p)
    tokens = str(text).split()
    if len(tokens) >= 2 and tokens[1].lower() in LATTICES:
        return build_structure(str(text))
    raise StructureError(
        f"{text!r}: neither an existing structure file nor a build spec; "
        "accepted: a file ASE reads, or 'ELEMENT LATTICE [a]' such as 'Cu fcc 3.61'"
    )
