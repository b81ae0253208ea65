"""Slater–Koster parameter sets: elements, pair integrals, loading of shipped and user files.

A :class:`ParameterSet` holds per-element onsite energies and, per element pair, the two-centre
hopping (and optionally overlap) integrals as distance laws with a smooth cutoff. Sets are read
from TOML files in the format documented in ``valband/params/README.md`` (schema version 1).

Sign convention of the integrals: Slater & Koster, Phys. Rev. 94, 1498 (1954). For the
directed pair (A, B) the bond runs from A to B; ``"sps"`` is s on A, p on B (σ) and
``"pss"`` is p on A, s on B, which equals ``"sps"`` of the pair (B, A).
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray

from valband.errors import InputError, ParameterError
from valband.params.laws import Cutoff, DistanceLaw

__all__ = [
    "BOND_INTEGRALS",
    "REVERSED_PARTNER",
    "ElementParams",
    "PairParams",
    "ParameterSet",
    "load_parameter_set",
    "list_parameter_sets",
    "integral_shells",
    "orthogonal_counterpart",
]

#: The 14 two-centre integrals in column order: (shell on first atom)(shell on second atom)
#: (σ/π/δ written s/p/d).
BOND_INTEGRALS: tuple[str, ...] = (
    "sss", "sps", "pss", "sds", "dss", "pps", "ppp",
    "pds", "pdp", "dps", "dpp", "dds", "ddp", "ddd",
)  # fmt: skip

#: Integral ↔ its reverse-direction partner (``hopping(a, b)["pss"] == hopping(b, a)["sps"]``);
#: the six integrals between equal shells are their own partner.
REVERSED_PARTNER: dict[str, str] = {
    "sss": "sss", "sps": "pss", "pss": "sps", "sds": "dss", "dss": "sds", "pps": "pps",
    "ppp": "ppp", "pds": "dps", "dps": "pds", "pdp": "dpp", "dpp": "pdp", "dds": "dds",
    "ddp": "ddp", "ddd": "ddd",
}  # fmt: skip

_COLUMN = {name: i for i, name in enumerate(BOND_INTEGRALS)}
_SWAP = np.array([_COLUMN[REVERSED_PARTNER[name]] for name in BOND_INTEGRALS])
#: For like pairs the reversed integrals equal these forward ones.
_LIKE_COPY = {"pss": "sps", "dss": "sds", "dps": "pds", "dpp": "pdp"}


def integral_shells(name: str) -> tuple[str, str]:
    """Shells (on the first atom, on the second atom) that integral ``name`` couples."""
    return name[0], name[1]


def _data_dir() -> Path:
    return Path(str(resources.files("valband").joinpath("data", "params")))


@dataclass(frozen=True)
class ElementParams:
    """Per-element data of a parameter set.

    Attributes
    ----------
    symbol : str
        Chemical symbol.
    shells : tuple of str
        Valence shells, a subset of ("s", "p", "d") in that order.
    onsite : dict
        Onsite energy per shell, eV.
    valence_electrons : float
        Electrons the element contributes to the valence bands.
    provenance : dict
        Source of each value; keys ``"valence_electrons"`` and ``"onsite.<shell>"``.
    """

    symbol: str
    shells: tuple[str, ...]
    onsite: dict[str, float]
    valence_electrons: float
    provenance: dict[str, str]
    spin_orbit: dict[str, float] = field(default_factory=dict)  # shell → ξ in eV (optional)

    @property
    def n_orbitals(self) -> int:
        """Number of orbitals of the site (1 per s, 3 per p, 5 per d shell)."""
        return sum(2 * "spd".index(sh) + 1 for sh in self.shells)


@dataclass(frozen=True)
class PairParams:
    """Two-centre integrals of one element pair, stored in the direction ``first → second``.

    Attributes
    ----------
    first, second : str
        Elements; ``"sps"`` couples s on ``first`` with p on ``second``.
    cutoff : Cutoff
        Smooth cutoff shared by the hopping and overlap integrals.
    hopping : dict
        Integral name → distance law (eV). Only integrals whose shells both atoms carry are
        present; for like pairs the reversed names (pss, dss, dps, dpp) are not stored.
    overlap : dict or None
        Same for the overlap integrals (dimensionless); ``None`` in orthogonal sets.
    source : str
        Provenance of the pair's integrals (an integral's own ``source`` overrides it).
    """

    first: str
    second: str
    cutoff: Cutoff
    hopping: dict[str, DistanceLaw]
    overlap: dict[str, DistanceLaw] | None
    source: str

    @property
    def key(self) -> str:
        """The pair's key in the file, ``"A-B"``."""
        return f"{self.first}-{self.second}"

    def to_dict(self) -> dict[str, Any]:
        """The pair's table in the file format."""
        d: dict[str, Any] = {
            "source": self.source,
            "cutoff": self.cutoff.to_dict(),
            "hopping": {k: law.to_dict() for k, law in self.hopping.items()},
        }
        if self.overlap is not None:
            d["overlap"] = {k: law.to_dict() for k, law in self.overlap.items()}
        return d

    def evaluate(self, laws: dict[str, DistanceLaw], r: NDArray[np.float64]) -> NDArray[np.float64]:
        """Integrals in the stored direction, shape (len(r), 14), taper applied."""
        out = np.zeros((len(r), len(BOND_INTEGRALS)))
        inside = r < self.cutoff.outer
        if np.any(inside):
            ri = r[inside]
            block = np.zeros((len(ri), len(BOND_INTEGRALS)))
            for name, law in laws.items():
                block[:, _COLUMN[name]] = law(ri)
            if self.first == self.second:
                for rev, fwd in _LIKE_COPY.items():
                    block[:, _COLUMN[rev]] = block[:, _COLUMN[fwd]]
            out[inside] = block * self.cutoff.factor(ri)[:, None]
        return out


@dataclass(frozen=True)
class ParameterSet:
    """A complete Slater–Koster parameter set (see ``valband/params/README.md``).

    Attributes
    ----------
    name, version, description, provenance : str
        Identification and free-text provenance of the set.
    schema_version : int
        Version of the file format the set was read from.
    orthogonal : bool
        True when the basis is orthogonal (no overlap integrals).
    elements : dict
        Symbol → :class:`ElementParams`.
    pairs : dict
        (first, second) → :class:`PairParams`, one entry per unordered pair, keyed in the
        direction the file gives it.
    origin : str or None
        File the set was read from (for messages); not part of equality.
    orthogonal_counterpart : str or None
        Optional, non-orthogonal sets only: a shipped set name or a ``.toml`` path (relative
        to this set's file) of its orthogonal counterpart; see :func:`orthogonal_counterpart`.
    caution : str or None
        Optional: what the set must not be trusted for; every command prints it and every
        output records it.
    """

    name: str
    version: str
    schema_version: int
    description: str
    orthogonal: bool
    provenance: str
    elements: dict[str, ElementParams]
    pairs: dict[tuple[str, str], PairParams]
    origin: str | None = field(default=None, compare=False)
    orthogonal_counterpart: str | None = None
    caution: str | None = None

    # -- lookup ---------------------------------------------------------------------------
    def element(self, symbol: str) -> ElementParams:
        """Parameters of one element; ParameterError if the set does not have it."""
        try:
            return self.elements[symbol]
        except KeyError:
            raise ParameterError(
                f"parameter set {self.name!r} has no element {symbol!r}; it has: "
                + ", ".join(sorted(self.elements))
            ) from None

    def pair(self, a: str, b: str) -> PairParams:
        """Stored parameters of the unordered pair {a, b}; ParameterError if absent."""
        p = self.pairs.get((a, b)) or self.pairs.get((b, a))
        if p is None:
            raise ParameterError(
                f"parameter set {self.name!r} has no parameters for the pair {a}-{b}; it has "
                "pairs: " + ", ".join(q.key for q in self.pairs.values())
            )
        return p

    def cutoff(self, a: str, b: str) -> float:
        """Outer cutoff radius of the pair (Å, symmetric); every integral is 0 at and beyond."""
        return self.pair(a, b).cutoff.outer

    def max_cutoff(self) -> float:
        """Largest outer cutoff over all pairs (Å)."""
        return max(p.cutoff.outer for p in self.pairs.values())

    # -- evaluation -----------------------------------------------------------------------
    def _directed(self, laws_of: str, a: str, b: str, r: Any) -> NDArray[np.float64]:
        self.element(a)
        self.element(b)
        pair = self.pair(a, b)
        rr = np.atleast_1d(np.asarray(r, dtype=np.float64))
        if rr.ndim != 1:
            raise InputError(f"distances r must be a 1-D array in Å, got shape {rr.shape}")
        if not np.all(np.isfinite(rr)) or np.any(rr <= 0):
            raise InputError("distances r must be finite and > 0 Å")
        laws = pair.hopping if laws_of == "hopping" else pair.overlap
        assert laws is not None
        out = pair.evaluate(laws, rr)
        if (a, b) != (pair.first, pair.second):
            out = out[:, _SWAP]
        return out

    def hopping(self, a: str, b: str, r: NDArray[np.float64]) -> NDArray[np.float64]:
        """Hopping integrals of the directed pair a → b.

        Parameters
        ----------
        a, b : str
            Elements on the first and second atom; the bond vector runs from a to b.
        r : array_like, shape (n,)
            Bond lengths, Å (> 0).

        Returns
        -------
        ndarray, shape (n, 14)
            eV, columns in :data:`BOND_INTEGRALS` order, smooth cutoff applied, exactly 0 at
            and beyond the cutoff and for integrals whose shells are absent on either atom.
        """
        return self._directed("hopping", a, b, r)

    def overlap(self, a: str, b: str, r: NDArray[np.float64]) -> NDArray[np.float64] | None:
        """Overlap integrals of the directed pair a → b (dimensionless), or None if orthogonal.

        Same shape, columns and cutoff as :meth:`hopping`.
        """
        if self.orthogonal:
            return None
        return self._directed("overlap", a, b, r)

    # -- serialisation --------------------------------------------------------------------
    def to_dict(self) -> dict[str, Any]:
        """The set as the dict the TOML file parses to (schema version 1)."""
        elements: dict[str, Any] = {}
        for sym, el in self.elements.items():
            elements[sym] = {
                "shells": list(el.shells),
                "valence_electrons": {
                    "value": el.valence_electrons,
                    "source": el.provenance["valence_electrons"],
                },
                "onsite": {
                    sh: {"value": el.onsite[sh], "source": el.provenance[f"onsite.{sh}"]}
                    for sh in el.shells
                },
            }
            if el.spin_orbit:
                elements[sym]["spin_orbit"] = {
                    sh: {"value": v, "source": el.provenance[f"spin_orbit.{sh}"]}
                    for sh, v in el.spin_orbit.items()
                }
        out: dict[str, Any] = {
            "schema_version": self.schema_version,
            "name": self.name,
            "version": self.version,
            "description": self.description,
            "orthogonal": self.orthogonal,
        }
        if self.orthogonal_counterpart is not None:
            out["orthogonal_counterpart"] = self.orthogonal_counterpart
        if self.caution is not None:
            out["caution"] = self.caution
        out |= {
            "provenance": self.provenance,
            "elements": elements,
            "pairs": {p.key: p.to_dict() for p in self.pairs.values()},
        }
        return out

    @classmethod
    def from_dict(cls, d: dict[str, Any], origin: str | None = None) -> ParameterSet:
        """Validate a parsed TOML dict and build the set (ParameterError on any problem)."""
        from valband.params.schema import parse_parameter_dict

        return parse_parameter_dict(d, origin=origin)

    def summary(self) -> dict[str, Any]:
        """Elements, shells, cutoffs and provenance as a JSON-serialisable dict."""
        return {
            "name": self.name,
            "version": self.version,
            "schema_version": self.schema_version,
            "description": self.description,
            "orthogonal": self.orthogonal,
            "orthogonal_counterpart": self.orthogonal_counterpart,
            "caution": self.caution,
            "provenance": self.provenance,
            "origin": self.origin,
            "elements": {
                sym: {
                    "shells": list(el.shells),
                    "onsite_eV": dict(el.onsite),
                    "spin_orbit_eV": dict(el.spin_orbit),
                    "valence_electrons": el.valence_electrons,
                    "provenance": dict(el.provenance),
                }
                for sym, el in self.elements.items()
            },
            "pairs": {
                p.key: {
                    "cutoff_inner_A": p.cutoff.inner,
                    "cutoff_A": p.cutoff.outer,
                    "taper": p.cutoff.taper,
                    "source": p.source,
                    "hopping": {k: law.describe() for k, law in p.hopping.items()},
                    **(
                        {"overlap": {k: law.describe() for k, law in p.overlap.items()}}
                        if p.overlap is not None
                        else {}
                    ),
                }
                for p in self.pairs.values()
            },
        }


def list_parameter_sets() -> list[str]:
    """Names of the parameter sets shipped with valband (sorted)."""
    directory = _data_dir()
    if not directory.is_dir():
        return []
    return sorted(p.stem for p in directory.glob("*.toml"))


#: Parsed sets of this process, keyed by (file content hash, origin).
_MEMO: dict[tuple[str, str], ParameterSet] = {}


_CODE_TAG: list[str] = []


def _code_tag() -> str:
    """Hash of the modules that define a parsed set (a pickle from other code is never used)."""
    if not _CODE_TAG:
        import hashlib
        import sys

        h = hashlib.sha256(f"py{sys.version_info.major}.{sys.version_info.minor}".encode())
        here = Path(__file__).resolve().parent
        for name in ("model.py", "laws.py", "schema.py"):
            h.update((here / name).read_bytes())
        _CODE_TAG.append(h.hexdigest()[:16])
    return _CODE_TAG[0]


def _cache_file(digest: str) -> Path:
    from valband.cache import cache_root

    return cache_root() / "params" / f"{digest}-{_code_tag()}.pickle"


def _read_file(path: Path) -> ParameterSet:
    """Parse and validate a set, memoised per process and cached on disk by content hash.

    A large first-principles set takes about a second to parse and validate; the validated
    set is kept as a pickle in the user cache (:mod:`valband.cache`), keyed by the SHA-256 of
    the file's bytes and a hash of the defining modules' source and the Python version, so an
    edited file, changed code or another Python never sees a stale entry. A cache that cannot
    be read or written is ignored (the set is parsed as usual).
    """
    import hashlib
    import pickle

    try:
        raw = path.read_bytes()
    except OSError as exc:
        raise ParameterError(f"cannot read parameter file {path}: {exc.strerror or exc}") from None
    digest = hashlib.sha256(raw).hexdigest()
    key = (digest, str(path))
    if key in _MEMO:
        return _MEMO[key]
    cached = _cache_file(digest)
    pset = None
    if len(raw) > _CACHE_MIN_BYTES:
        try:
            with cached.open("rb") as fh:
                got = pickle.load(fh)
            if isinstance(got, ParameterSet) and got.origin == str(path):
                pset = got
        except Exception:  # noqa: BLE001 - any unreadable cache entry is simply rebuilt
            pset = None
    if pset is None:
        pset = _parse_bytes(path, raw)
        if len(raw) > _CACHE_MIN_BYTES:
            _write_cache(cached, pset)
    _MEMO[key] = pset
    return pset


#: Files smaller than this parse faster than a cache lookup pays for.
_CACHE_MIN_BYTES = 200_000


def _write_cache(target: Path, pset: ParameterSet) -> None:
    import contextlib
    import os
    import pickle
    import tempfile

    with contextlib.suppress(OSError, pickle.PicklingError, TypeError, AttributeError):
        target.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(dir=target.parent, suffix=".part")
        try:
            with os.fdopen(fd, "wb") as fh:
                pickle.dump(pset, fh, protocol=pickle.HIGHEST_PROTOCOL)
            os.replace(tmp, target)
        finally:
            with contextlib.suppress(FileNotFoundError):
                os.unlink(tmp)


def _parse_bytes(path: Path, raw: bytes) -> ParameterSet:
    try:
        data = tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError as exc:
        raise ParameterError(
            f"{path}: not UTF-8 text ({exc}); accepted: a UTF-8 TOML file"
        ) from None
    except tomllib.TOMLDecodeError as exc:
        raise ParameterError(
            f"{path}: not valid TOML ({exc}); accepted: TOML 1.0 in the format of "
            "valband/params/README.md (each key at most once)"
        ) from None
    return ParameterSet.from_dict(data, origin=str(path))


def load_parameter_set(name_or_path: str | Path) -> ParameterSet:
    """Read a parameter set from a ``.toml`` file or by the name of a shipped set.

    Parameters
    ----------
    name_or_path
        A path (``Path``, or a string ending in ``.toml`` or containing a path separator), or
        the name of a shipped set (see :func:`list_parameter_sets`).

    Raises
    ------
    ParameterError
        The file is missing or invalid, or no shipped set has that name.
    """
    if isinstance(name_or_path, Path):
        return _read_file(name_or_path)
    text = str(name_or_path)
    if text.endswith(".toml") or "/" in text or "\\" in text:
        return _read_file(Path(text))
    shipped = _data_dir() / f"{text}.toml"
    if shipped.is_file():
        return _read_file(shipped)
    raise ParameterError(
        f"no shipped parameter set named {text!r} (and it is not a .toml path); accepted: "
        + ", ".join(list_parameter_sets())
        + ", or a path to a .toml file"
    )


def orthogonal_counterpart(params: ParameterSet | str | Path) -> ParameterSet:
    """Return the orthogonal set to use in place of ``params`` (CPA, fast KPM).

    An orthogonal set is its own counterpart. A non-orthogonal set names its counterpart with
    the optional top-level key ``orthogonal_counterpart`` (a shipped set name, or a ``.toml``
    path, relative paths taken from the set's own folder); without the key the shipped set
    ``<name>-orth`` is used if there is one.

    Parameters
    ----------
    params : ParameterSet, or a name or path that :func:`load_parameter_set` reads

    Raises
    ------
    ParameterError
        The set names no counterpart and no ``<name>-orth`` is shipped (the message says how to
        make one), or the counterpart is not orthogonal or lacks some of the set's elements.
    """
    ps = params if isinstance(params, ParameterSet) else load_parameter_set(params)
    if ps.orthogonal:
        return ps
    ref = ps.orthogonal_counterpart
    if ref is None:
        if f"{ps.name}-orth" not in list_parameter_sets():
            raise ParameterError(
                f"parameter set {ps.name!r} is non-orthogonal and names no orthogonal "
                f"counterpart; accepted: an orthogonal set, or make one with 'valband params "
                f"orthogonal {ps.origin or ps.name} --out {ps.name}-orth.toml' and add "
                f"orthogonal_counterpart = \"{ps.name}-orth.toml\" to the set's top level")
        ref = f"{ps.name}-orth"
    target: str | Path = ref
    looks_like_path = ref.endswith(".toml") or "/" in ref or "\\" in ref
    if looks_like_path and ps.origin and not Path(ref).is_absolute():
        target = Path(ps.origin).parent / ref
    try:
        orth = load_parameter_set(target)
    except ParameterError as exc:
        raise ParameterError(f"parameter set {ps.name!r}: its orthogonal counterpart {ref!r} "
                             f"cannot be loaded: {exc}") from None
    if not orth.orthogonal:
        raise ParameterError(f"parameter set {ps.name!r}: its orthogonal counterpart "
                             f"{orth.name!r} is not orthogonal; accepted: a set with "
                             "orthogonal = true")
    missing = sorted(set(ps.elements) - set(orth.elements))
    if missing:
        raise ParameterError(f"parameter set {ps.name!r}: its orthogonal counterpart "
                             f"{orth.name!r} lacks {', '.join(missing)}; accepted: a "
                             "counterpart with every element of the set")
    return orth
