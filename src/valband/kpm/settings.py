"""KPM settings and the rules that turn a requested resolution into moments and vectors.

Moments (from the Jackson kernel width)
    N = the smallest integer with a·σ_J(N, 0) ≤ δ, where δ is the requested resolution (eV,
    the Gaussian σ of the kernel at the centre of the spectrum), a the half width of the
    scaled spectrum and σ_J WWAF Eq. (72); N ≈ π a / δ. Near the band edges the kernel is
    narrower (σ ∝ √(1 − x²)).

Random vectors (from the stochastic error at that resolution)
    For a random-phase vector r (|r_i| = 1) the estimate ⟨r|P F P|r⟩ of Tr PF has variance
    Σ_{i≠j∈P} |F_ij|² ≤ Tr (PF)², and for F the kernel-broadened δ(E − A) on a channel of D_c
    orbitals, Tr F² ≈ D_c ρ̄ / (2√π δ) while (Tr F)² = (D_c ρ̄)², ρ̄ ≈ 1/(2a) the mean density
    per orbital and unit energy (WWAF Sec. II.D gives the 1/√(R D) law). The relative error of
    a channel's DOS is therefore ≈ √(a / (√π δ D_c R)), and R = ⌈a / (√π δ D_c η²)⌉ vectors
    reach the target relative error η (``accuracy``) for the smallest channel D_c of the shell
    ``accuracy_shell`` (default d: the d channel of the minority element of an alloy; all
    channels when no channel has that shell).
    ``trace="auto"`` takes the exact trace over all n basis vectors instead whenever that is
    no dearer, n ≤ 2R (a complex random-phase vector costs two real recursions).
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass
from typing import Literal

from valband.errors import SettingsError

__all__ = ["KPMSettings", "vectors_for_accuracy"]

Resolve = Literal["element", "site"]


@dataclass(frozen=True)
class KPMSettings:
    """Settings of a KPM DOS (all recorded in the result).

    resolution : δ in eV, the Jackson kernel's Gaussian σ at the band centre (sets N)
    n_moments : N (None: from ``resolution``)
    accuracy : target relative stochastic error η of the smallest channel's DOS (sets R)
    accuracy_shell : shell whose smallest channel the accuracy refers to ("s", "p", "d" or
        None for all channels)
    n_vectors : R complex random-phase vectors (None: from ``accuracy``)
    trace : "auto", "stochastic" (random-phase vectors) or "exact" (all basis vectors)
    seed : seed of the random-phase vectors and of the Lanczos start vector
    resolve : "element" (channels per element and shell, summed over sites) or "site"
    step : energy grid step in eV (None: resolution / 4)
    emin, emax : grid limits relative to E_F in eV (None: the scaled spectrum's ends)
    n_electrons : valence electrons (None: from the parameter set)
    margin : ε of the spectral scaling (WWAF Eq. (4))
    lanczos_steps : Lanczos steps for the spectral bounds
    cg_tol : relative residual of the overlap solves (non-orthogonal sets)
    memory_mb : budget of the vector blocks (sets how many vectors run together)
    backend : "numba" kernels or the "scipy" reference
    threads : numba threads (None: numba's default)
    """

    resolution: float = 0.1
    n_moments: int | None = None
    accuracy: float = 0.05
    accuracy_shell: str | None = "d"
    n_vectors: int | None = None
    trace: Literal["auto", "stochastic", "exact"] = "auto"
    seed: int = 0
    resolve: Resolve = "element"
    step: float | None = None
    emin: float | None = None
    emax: float | None = None
    n_electrons: float | None = None
    margin: float = 0.05
    lanczos_steps: int = 40
    cg_tol: float = 1e-10
    memory_mb: float = 256.0
    backend: Literal["numba", "scipy"] = "numba"
    threads: int | None = None

    def validate(self) -> None:
        """Raise :class:`SettingsError` naming the first invalid setting."""
        def positive(name, v):
            if not (isinstance(v, (int, float)) and math.isfinite(v) and v > 0):
                raise SettingsError(f"KPM {name} {v!r}: must be a positive number")

        positive("resolution (eV)", self.resolution)
        positive("accuracy", self.accuracy)
        positive("memory_mb", self.memory_mb)
        positive("cg_tol", self.cg_tol)
        if self.n_moments is not None and (int(self.n_moments) != self.n_moments
                                           or self.n_moments < 2):
            raise SettingsError(f"KPM n_moments {self.n_moments!r}: an integer ≥ 2")
        if self.n_vectors is not None and (int(self.n_vectors) != self.n_vectors
                                           or self.n_vectors < 1):
            raise SettingsError(f"KPM n_vectors {self.n_vectors!r}: an integer ≥ 1")
        if self.accuracy_shell not in (None, "s", "p", "d"):
            raise SettingsError(f"KPM accuracy_shell {self.accuracy_shell!r}: s, p, d or None")
        if self.trace not in ("auto", "stochastic", "exact"):
            raise SettingsError(f"KPM trace {self.trace!r}: accepted auto, stochastic, exact")
        if self.resolve not in ("element", "site"):
            raise SettingsError(f"KPM resolve {self.resolve!r}: accepted element, site")
        if not isinstance(self.seed, int) or self.seed < 0:
            raise SettingsError(f"KPM seed {self.seed!r}: a non-negative integer")
        if self.step is not None:
            positive("step (eV)", self.step)
        if not 0 < self.margin < 1:
            raise SettingsError(f"KPM margin {self.margin!r}: accepted 0 < ε < 1")
        if int(self.lanczos_steps) < 2:
            raise SettingsError(f"KPM lanczos_steps {self.lanczos_steps!r}: at least 2")
        if self.backend not in ("numba", "scipy"):
            raise SettingsError(f"KPM backend {self.backend!r}: accepted numba, scipy")
        if self.threads is not None and (int(self.threads) != self.threads or self.threads < 1):
            raise SettingsError(f"KPM threads {self.threads!r}: an integer ≥ 1")
        if self.emin is not None and self.emax is not None and not self.emin < self.emax:
            raise SettingsError(f"KPM energy range [{self.emin}, {self.emax}] eV: emin < emax")

    def to_dict(self) -> dict:
        """JSON-ready dict."""
        return asdict(self)


def vectors_for_accuracy(half_width: float, resolution: float, smallest_channel: int,
                         accuracy: float) -> int:
    """R = ⌈a / (√π δ D_c η²)⌉ (module docstring), at least 1."""
    d = max(int(smallest_channel), 1)
    return max(1, math.ceil(half_width / (math.sqrt(math.pi) * resolution * d * accuracy ** 2)))
