"""Elements, ground-state electron configurations (Z = 1–92) and a configuration parser.

A configuration is a tuple of ``(n, l, occupation)`` triples, one per subshell, sorted by
(n, l); occupations may be fractional (spherically averaged open shells) and may be zero (an
empty level whose eigenvalue is wanted).

Ground states
    Madelung (n + l, then n) filling with the exceptions of the experimental ground
    configurations as used by NIST SRD 141 (Kotochigova et al., Phys. Rev. A 55, 191 (1997)):
    Cr, Cu, Nb, Mo, Ru, Rh, Pd (4d¹⁰), Ag, La, Ce, Gd, Pt (5d⁹6s¹), Au, Ac, Th, Pa, U.
    The Cu, Ag, Pd, Pt, Au, Ni and Fe configurations are those listed with the NIST reference
    data in ``shared/reference/README.md``; the others are from memory of the same tables
    (they agree with the ground levels of the NIST Atomic Spectra Database).

Ions
    A positive ``charge`` removes electrons from the subshell of highest n (then highest l)
    first, so Fe²⁺ is 3d⁶ and Cu⁺ is 3d¹⁰; a negative one fills the next subshells in
    Madelung order.

Text form
    ``"[Ar] 3d10 4s1"``, ``"1s2 2s2 2p6"``, ``"3d9.5 4s1.5"``; a noble-gas core in brackets
    ([He], [Ne], [Ar], [Kr], [Xe], [Rn]), then subshells ``<n><letter><occupation>`` separated
    by spaces or commas. :func:`format_configuration` writes the same form.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterable, Sequence

from valband.errors import InputError

__all__ = [
    "ELEMENTS",
    "L_LETTERS",
    "Configuration",
    "ConfigurationError",
    "resolve_element",
    "ground_state_configuration",
    "parse_configuration",
    "format_configuration",
    "normalize_configuration",
    "electron_count",
    "check_electron_count",
    "ionize",
]

#: One (n, l, occupation) triple per subshell.
Configuration = tuple[tuple[int, int, float], ...]

#: Element symbols by atomic number (index 0 is Z = 1).
ELEMENTS: tuple[str, ...] = tuple(
    """H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se
    Br Kr Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy
    Ho Er Tm Yb Lu Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U""".split()
)
_Z_OF = {s.lower(): i + 1 for i, s in enumerate(ELEMENTS)}

#: Subshell letters by l.
L_LETTERS = "spdfgh"

_MADELUNG: tuple[tuple[int, int], ...] = tuple(
    sorted(
        ((n, l) for n in range(1, 8) for l in range(min(n, 4))),  # noqa: E741
        key=lambda nl: (nl[0] + nl[1], nl[0]),
    )  # noqa: E741
)

_CORES = {
    "He": "1s2",
    "Ne": "[He] 2s2 2p6",
    "Ar": "[Ne] 3s2 3p6",
    "Kr": "[Ar] 3d10 4s2 4p6",
    "Xe": "[Kr] 4d10 5s2 5p6",
    "Rn": "[Xe] 4f14 5d10 6s2 6p6",
}

# Experimental ground configurations that differ from Madelung filling (see module docstring).
_EXCEPTIONS = {
    24: "[Ar] 3d5 4s1",
    29: "[Ar] 3d10 4s1",
    41: "[Kr] 4d4 5s1",
    42: "[Kr] 4d5 5s1",
    44: "[Kr] 4d7 5s1",
    45: "[Kr] 4d8 5s1",
    46: "[Kr] 4d10",
    47: "[Kr] 4d10 5s1",
    57: "[Xe] 5d1 6s2",
    58: "[Xe] 4f1 5d1 6s2",
    64: "[Xe] 4f7 5d1 6s2",
    78: "[Xe] 4f14 5d9 6s1",
    79: "[Xe] 4f14 5d10 6s1",
    89: "[Rn] 6d1 7s2",
    90: "[Rn] 6d2 7s2",
    91: "[Rn] 5f2 6d1 7s2",
    92: "[Rn] 5f3 6d1 7s2",
}

_TOKEN = re.compile(r"^(\d+)([A-Za-z])\^?([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)$")
_CORE_TOKEN = re.compile(r"^\[([A-Za-z]{2})\]$")
_COUNT_TOL = 1e-9


class ConfigurationError(InputError):
    """An element or electron configuration is invalid."""


def resolve_element(element: str | int) -> tuple[int, str]:
    """Atomic number and symbol of ``element`` (symbol, case-insensitive, or Z = 1–92)."""
    if isinstance(element, bool):
        raise ConfigurationError(
            f"element must be a symbol or an atomic number 1-92, got {element!r}"
        )
    if isinstance(element, int) or (hasattr(element, "__index__") and not isinstance(element, str)):
        z = int(element)
        if not 1 <= z <= len(ELEMENTS):
            raise ConfigurationError(f"atomic number must lie in 1-{len(ELEMENTS)}, got {z}")
        return z, ELEMENTS[z - 1]
    if isinstance(element, str):
        key = element.strip().lower()
        if key in _Z_OF:
            z = _Z_OF[key]
            return z, ELEMENTS[z - 1]
        raise ConfigurationError(
            f"unknown element {element!r}; accepted: element symbols H-U or atomic numbers 1-{len(ELEMENTS)}"
        )
    raise ConfigurationError(f"element must be a symbol or an atomic number 1-92, got {element!r}")


def _capacity(l: int) -> int:  # noqa: E741
    return 2 * (2 * l + 1)


def _label(n: int, l: int) -> str:  # noqa: E741
    return f"{n}{L_LETTERS[l]}" if l < len(L_LETTERS) else f"n={n},l={l}"


def _check_subshell(n, l, occ) -> tuple[int, int, float]:  # noqa: E741
    if isinstance(l, str):
        if len(l) != 1 or l.lower() not in L_LETTERS:
            raise ConfigurationError(
                f"unknown subshell letter {l!r}; accepted: {', '.join(L_LETTERS)}"
            )
        l = L_LETTERS.index(l.lower())  # noqa: E741
    try:
        n_i, l_i, f = int(n), int(l), float(occ)
    except (TypeError, ValueError) as exc:
        raise ConfigurationError(
            f"subshell must be (n, l, occupation) numbers, got {(n, l, occ)!r}"
        ) from exc
    if n_i != n or l_i != l:
        raise ConfigurationError(f"n and l must be integers, got n={n!r}, l={l!r}")
    if n_i < 1:
        raise ConfigurationError(f"principal quantum number n must be >= 1, got {n_i}")
    if l_i < 0 or l_i >= n_i:
        raise ConfigurationError(
            f"subshell {n_i}{L_LETTERS[l_i] if 0 <= l_i < len(L_LETTERS) else '?'}: angular momentum "
            f"l={l_i} is not allowed for n={n_i} (needs 0 <= l < n)"
        )
    if not math.isfinite(f):
        raise ConfigurationError(f"occupation of {_label(n_i, l_i)} must be finite, got {occ!r}")
    if f < 0:
        raise ConfigurationError(
            f"occupation of {_label(n_i, l_i)} must not be negative, got {f:g}"
        )
    if f > _capacity(l_i) + _COUNT_TOL:
        raise ConfigurationError(
            f"subshell {_label(n_i, l_i)} holds at most 2(2l+1) = {_capacity(l_i)} electrons, got {f:g}"
        )
    return n_i, l_i, min(f, float(_capacity(l_i)))


def normalize_configuration(config: Iterable[Sequence]) -> Configuration:
    """Validate ``(n, l, occupation)`` triples (l as int or letter) and sort them by (n, l).

    Raises
    ------
    ConfigurationError
        l ≥ n, negative or over-capacity occupations, repeated subshells.
    """
    out: dict[tuple[int, int], float] = {}
    for item in config:
        try:
            n, l, occ = item  # noqa: E741
        except (TypeError, ValueError) as exc:
            raise ConfigurationError(
                f"each subshell must be a triple (n, l, occupation), got {item!r}"
            ) from exc
        n, l, occ = _check_subshell(n, l, occ)  # noqa: E741
        if (n, l) in out:
            raise ConfigurationError(f"subshell {_label(n, l)} is given more than once")
        out[(n, l)] = occ
    if not out:
        raise ConfigurationError("configuration is empty; give at least one subshell such as '1s1'")
    return tuple((n, l, out[(n, l)]) for n, l in sorted(out))  # noqa: E741


def parse_configuration(text: str) -> Configuration:
    """Parse a configuration such as ``"[Ar] 3d10 4s1"`` or ``"3d9.5 4s1.5"``.

    Parameters
    ----------
    text : str
        Optional noble-gas core in brackets, then subshells ``<n><letter><occupation>``.

    Returns
    -------
    Configuration
        (n, l, occupation) triples sorted by (n, l).

    Raises
    ------
    ConfigurationError
        Unreadable token, unknown core, l ≥ n, negative or over-capacity occupation,
        repeated subshell.
    """
    if not isinstance(text, str):
        raise ConfigurationError(f"configuration text must be a string, got {type(text).__name__}")
    tokens = [t for t in re.split(r"[\s,;]+", text.strip()) if t]
    items: list[tuple[int, int, float]] = []
    for tok in tokens:
        core = _CORE_TOKEN.match(tok)
        if core:
            sym = core.group(1).capitalize()
            if sym not in _CORES:
                raise ConfigurationError(
                    f"unknown core {tok!r} in configuration {text!r}; accepted: "
                    + ", ".join(f"[{c}]" for c in _CORES)
                )
            items.extend(parse_configuration(_CORES[sym]))
            continue
        mt = _TOKEN.match(tok)
        if not mt:
            raise ConfigurationError(
                f"cannot read {tok!r} in configuration {text!r}: expected subshells like '3d10' or "
                "'4s1.5', optionally after a noble-gas core like '[Ar]'"
            )
        letter = mt.group(2).lower()
        if letter not in L_LETTERS:
            raise ConfigurationError(
                f"unknown subshell letter {mt.group(2)!r} in {tok!r}; accepted: {', '.join(L_LETTERS)}"
            )
        items.append((int(mt.group(1)), L_LETTERS.index(letter), float(mt.group(3))))
    return normalize_configuration(items)


def _format_occ(f: float) -> str:
    return str(int(f)) if float(f).is_integer() else repr(float(f))


def format_configuration(config: Iterable[Sequence], *, core: bool = True) -> str:
    """Text form of a configuration (inverse of :func:`parse_configuration`).

    Parameters
    ----------
    config : iterable of (n, l, occupation)
    core : bool
        Abbreviate the largest filled noble-gas core as ``[Ar]`` etc.
    """
    cfg = normalize_configuration(config)
    occ = {(n, l): f for n, l, f in cfg}  # noqa: E741
    parts: list[str] = []
    if core:
        for sym in reversed(list(_CORES)):
            shells = parse_configuration(_CORES[sym])
            if all(occ.get((n, l)) == f for n, l, f in shells):  # noqa: E741
                parts.append(f"[{sym}]")
                for n, l, _ in shells:  # noqa: E741
                    del occ[(n, l)]
                break
    parts.extend(f"{_label(n, l)}{_format_occ(f)}" for (n, l), f in sorted(occ.items()))  # noqa: E741
    return " ".join(parts)


def electron_count(config: Iterable[Sequence]) -> float:
    """Total number of electrons in a configuration."""
    return float(sum(float(t[2]) for t in config))


def _neutral(z: int) -> Configuration:
    if z in _EXCEPTIONS:
        return parse_configuration(_EXCEPTIONS[z])
    left = float(z)
    items = []
    for n, l in _MADELUNG:  # noqa: E741
        if left <= 0:
            break
        f = min(left, _capacity(l))
        items.append((n, l, f))
        left -= f
    return normalize_configuration(items)


def ionize(config: Iterable[Sequence], charge: float) -> Configuration:
    """Remove (charge > 0) or add (charge < 0) electrons.

    Electrons leave the subshell of highest n, then highest l; added electrons fill the first
    subshells in Madelung order that have room. Emptied subshells are dropped.
    """
    cfg = {(n, l): f for n, l, f in normalize_configuration(config)}  # noqa: E741
    charge = float(charge)
    if charge > 0:
        left = charge
        for key in sorted(cfg, reverse=True):
            take = min(left, cfg[key])
            cfg[key] -= take
            left -= take
            if left <= _COUNT_TOL:
                break
        if left > _COUNT_TOL:
            raise ConfigurationError(
                f"charge {charge:g} removes more electrons than the configuration has"
            )
        cfg = {k: f for k, f in cfg.items() if f > _COUNT_TOL}
    elif charge < 0:
        left = -charge
        for key in _MADELUNG:
            room = _capacity(key[1]) - cfg.get(key, 0.0)
            if room <= 0:
                continue
            add = min(room, left)
            cfg[key] = cfg.get(key, 0.0) + add
            left -= add
            if left <= _COUNT_TOL:
                break
    return normalize_configuration((n, l, f) for (n, l), f in cfg.items())  # noqa: E741


def ground_state_configuration(element: str | int, charge: float = 0.0) -> Configuration:
    """Ground-state configuration of a neutral atom or ion.

    Parameters
    ----------
    element : str or int
        Symbol or atomic number (1–92).
    charge : float
        Ionic charge in units of e (positive removes electrons); fractional values allowed.

    Returns
    -------
    Configuration
        (n, l, occupation) triples sorted by (n, l), Z − charge electrons in total.
    """
    z, _ = resolve_element(element)
    charge = _check_charge(z, charge)
    cfg = _neutral(z)
    return ionize(cfg, charge) if charge != 0 else cfg


def _check_charge(z: int, charge: float) -> float:
    try:
        c = float(charge)
    except (TypeError, ValueError) as exc:
        raise ConfigurationError(f"charge must be a number (units of e), got {charge!r}") from exc
    if not math.isfinite(c):
        raise ConfigurationError(f"charge must be finite, got {charge!r}")
    if c >= z:
        raise ConfigurationError(
            f"charge {c:g} leaves no electrons for Z = {z}; accepted: charge < Z"
        )
    if c < -4:
        raise ConfigurationError(f"charge {c:g} is out of range; accepted: -4 <= charge < Z")
    return c


def check_electron_count(config: Configuration, z: int, charge: float) -> None:
    """Raise :class:`ConfigurationError` unless the configuration holds Z − charge electrons."""
    count = electron_count(config)
    want = z - float(charge)
    if abs(count - want) > 1e-8:
        raise ConfigurationError(
            f"configuration {format_configuration(config)!r} holds {count:g} electrons, but "
            f"Z - charge = {z} - {float(charge):g} = {want:g}; fix the occupations or the charge"
        )
