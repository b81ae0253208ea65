"""Benchmark of ``simulate_spectrum`` from an existing DOSResult (ratio to numpy FFTs, one process).

Target: Cu fcc DOS (3 channels, default DOS grid, step 0.01 eV) → spectrum in < 0.2 s. The time
is printed together with a baseline measured in the same run — one numpy real FFT pair
(rfft + irfft) of every channel, padded to the same length as the instrument convolution — and
their ratio, so that machines of different speed can be compared.
"""

from __future__ import annotations

import numpy as np
from timing import best_of


def main(repeat: int = 5) -> None:
    from valband.params import load_parameter_set
    from valband.spectra import simulate_spectrum
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_dos

    model = build_model(build_structure("Cu fcc"), load_parameter_set("harrison-universal"))
    dos = compute_dos(model, DOSSettings(mesh=16, step=0.01))
    simulate_spectrum(dos, "Al-Ka")  # compile and load the tables
    t_sim = best_of(lambda: simulate_spectrum(dos, "Al-Ka"), repeat)
    n = 2 * dos.energies.size
    y = np.ascontiguousarray(dos.channels)
    t_fft = best_of(lambda: np.fft.irfft(np.fft.rfft(y, n, axis=-1), n, axis=-1), repeat * 20)
    print(f"grid points {dos.energies.size}, channels {len(dos.channel_labels)}")
    print(f"simulate      {t_sim * 1e3:9.2f} ms   (target < 200 ms)")
    print(f"numpy FFT     {t_fft * 1e3:9.3f} ms   (baseline: rfft+irfft of all channels, n={n})")
    print(f"ratio         {t_sim / t_fft:9.1f}")


if __name__ == "__main__":
    main()
