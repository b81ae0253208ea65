"""Results of spin runs: DOS per spin and per j, site moments, the Stoner iteration record."""

from __future__ import annotations

from dataclasses import dataclass, field

from valband.results import DOSResult

__all__ = ["MagneticReport", "SpinDOSResult"]


@dataclass(frozen=True)
class MagneticReport:
    """How the Stoner self-consistency went.

    Attributes
    ----------
    converged : bool (always True in a returned result: non-convergence raises)
    non_magnetic : bool — every |m| below ``tolerance`` at convergence
    iterations : int; residual : float, μB (max |m_out − m_in| at the end)
    tolerance : float, μB; mixing : float (Anderson β); history : int; max_step : float, μB
    order : "fm", "afm" or "given"; initial_moments : per site, μB
    d_moments : per site, μB (the moments that set ΔE = I m)
    splitting_eV : per site, ΔE_i = I_i m_i
    stoner : element → {"value_ev", "source"}
    residual_history, moment_history : per iteration
    """

    converged: bool
    non_magnetic: bool
    iterations: int
    residual: float
    tolerance: float
    mixing: float
    history: int
    max_step: float
    order: str
    initial_moments: tuple[float, ...]
    d_moments: tuple[float, ...]
    splitting_eV: tuple[float, ...]
    stoner: dict
    residual_history: tuple[float, ...] = ()
    moment_history: tuple[tuple[float, ...], ...] = ()

    def to_dict(self) -> dict:
        """JSON form."""
        return {
            "converged": self.converged,
            "non_magnetic": self.non_magnetic,
            "iterations": self.iterations,
            "residual_muB": self.residual,
            "tolerance_muB": self.tolerance,
            "mixing": {"scheme": "Anderson (Eyert 1996)", "beta": self.mixing,
                       "history": self.history, "max_step_muB": self.max_step},
            "order": self.order,
            "initial_moments_muB": list(self.initial_moments),
            "d_moments_muB": list(self.d_moments),
            "exchange_splitting_eV": list(self.splitting_eV),
            "stoner_eV": self.stoner,
            "residual_history_muB": list(self.residual_history),
            "moment_history_muB": [list(m) for m in self.moment_history],
        }


@dataclass(frozen=True, eq=False)
class SpinDOSResult:
    """DOS of a spin–orbit and/or Stoner run.

    Attributes
    ----------
    total : DOSResult — both spins, site × shell channels (what describe / simulate_spectrum take)
    up, down : DOSResult or None — one spin each (same E_F and grid), present in magnetic runs;
        their ``n_electrons`` is the electron count of that spin
    j_resolved : DOSResult or None — spin–orbit runs: channels site × shell × j, the j label in
        ``Channel.orbital`` (``"d5/2"``); summed over j they give ``total``'s channels
    moments : dict or None — ``{"sites": [...], "elements": {El: μB per atom}, "cell": μB}``
        (whole-site Mulliken spin moments n↑ − n↓ along z)
    magnetism : MagneticReport or None
    spin_orbit : list of {"element", "shell", "xi_ev", "source"}
    model : the SpinModel of the last iteration (for bands; not serialised)
    """

    total: DOSResult
    up: DOSResult | None = None
    down: DOSResult | None = None
    j_resolved: DOSResult | None = None
    moments: dict | None = None
    magnetism: MagneticReport | None = None
    spin_orbit: tuple[dict, ...] = ()
    model: object = field(default=None, repr=False)

    @property
    def fermi_level(self) -> float:
        """E_F on the model's absolute scale, eV."""
        return self.total.fermi_level

    def to_dict(self) -> dict:
        """JSON-ready dictionary (the DOS results in full, the model left out)."""
        opt = lambda r: None if r is None else r.to_dict()  # noqa: E731
        return {
            "kind": "valband.spin_dos",
            "total": self.total.to_dict(),
            "up": opt(self.up),
            "down": opt(self.down),
            "j_resolved": opt(self.j_resolved),
            "moments_muB": self.moments,
            "magnetism": opt(self.magnetism),
            "spin_orbit": list(self.spin_orbit),
        }

    def summary(self) -> dict:
        """Small dict for run summaries: E_F, moments, spin–orbit constants, Stoner record."""
        out = {"fermi_level_eV": self.fermi_level, "spin_orbit": list(self.spin_orbit),
               "moments_muB": self.moments}
        if self.magnetism is not None:
            m = self.magnetism.to_dict()
            m.pop("moment_history_muB")
            out["magnetism"] = m
        return out
