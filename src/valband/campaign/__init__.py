"""Screening campaigns: many candidates, one executor interface, one SQLite results file.

A campaign file (TOML, our own schema, version 1) lists systems; each system expands into
candidates (composition × structure × strain); each candidate is a DOS (k-mesh or KPM), its
descriptors and optional spectra. ``valband screen CAMPAIGN`` runs the candidates missing
from the database on local worker processes or a Dask cluster, one row per candidate.

Campaign file schema (version 1)
================================

Top level::

    schema = 1                       # required: the campaign schema version

    [campaign]                       # required
    name = "cu-pd-screen"            # required: a label, stored in the database
    description = "..."              # optional
    seed = 2024                      # optional, default 0: master seed (see Seeds)
    scheduler = "tcp://10.0.0.5:8786" # optional: run on this Dask scheduler
    workers = 2                      # optional: local worker processes (default: all
                                     #   cores; 0: in the calling process)

    [defaults]                       # optional: options for every system (keys below)

    [[system]]                       # one or more
    ...

Options (in ``[defaults]`` and in any ``[[system]]``, which overrides them)::

    params = "valband-tc2-2026"      # a shipped parameter set, or a .toml path (relative
                                     #   to the campaign file); hashed into the inputs;
                                     #   default: the program's default set
    method = "kmesh"                 # "kmesh" (default) | "kpm" | "cpa"
    strains = [0.0]                  # strains, fractions in [-0.2, 0.2]; 0 = unstrained
    strain_mode = "uniform"          # "uniform" (spec option strain=E) | "biaxial" (biaxial=E)
    descriptors = ["d"]              # shells to describe: any of "s", "p", "d"
    window = [-10.0, 4.0]            # descriptor window, eV relative to E_F (default: the
                                     #   whole DOS grid)
    spectra = [1486.6, "He-II"]      # photon energies (eV) or source names; default none
    spectrum_fwhm = 0.3              # instrument Gaussian FWHM, eV
    temperature = 300.0              # K, for the Fermi–Dirac edge of the spectra

    [defaults.kmesh]                 # method "kmesh" (valband.workflows.DOSSettings)
    mesh = 12                        # N, "N1xN2xN3" or [N1, N2, N3]
    smearing = "gaussian"            # "gaussian" | "lorentzian" | "tetrahedron"
    width = 0.1                      # eV
    step = 0.02                      # eV
    symmetry = true                  # reduce the mesh by symmetry
    mesh_kind = "monkhorst-pack"     # or "gamma"
    neutral = "auto"                 # charge self-consistency as the CLI's --neutral: "auto"
                                     #   (site neutrality for alloys and surfaces) | "off" |
                                     #   "site" | "element" | "layer"

    [defaults.kpm]                   # method "kpm" (valband.kpm.KPMSettings; Γ of the cell)
    resolution = 0.1                 # eV, Jackson kernel σ (sets the moments)
    accuracy = 0.05                  # relative stochastic error target (sets the vectors)
    n_moments = 800                  # optional: override the rule
    n_vectors = 4                    # optional: override the rule
    trace = "auto"                   # "auto" | "stochastic" | "exact"
    resolve = "element"              # "element" | "site" | "layer" (slabs: one channel per
                                     #   layer, element and shell)
    repeat = [6, 6, 6]               # repeat the spec's cell first (default [1, 1, 1])
    step = 0.025                     # eV (default resolution / 4)
    margin = 0.05                    # spectral margin ε
    memory_mb = 256                  # vector-block budget
    lanczos_steps = 40

    [defaults.cpa]                   # mesh (Γ-centred), eta (Lorentzian η, eV; default
                                     #   0.1), step; structures must be 'random …'/'sqs …'
                                     #   templates (composition on a lattice) or one-site
                                     #   pure end points; orthogonal parameter sets only

System keys::

    name = "CuPd"                    # optional label (default: the elements joined)
    elements = ["Cu", "Pd"]          # 2 (binary) or 3 (ternary) elements → a composition grid
    step = 0.25                      # grid spacing in atomic fraction (must divide 1) …
    fractions = [[0.75, 0.25]]       # … or explicit points (one fraction per element)
    structures = [                   # required: spec templates (valband.structure.specs)
        "random {composition} fcc 2x2x2 seed={seed}",
        "sqs {composition} fcc 8 seed={seed}",
    ]
    pure = "{element} fcc"           # template for grid points with one element; without it
                                     #   those points are left out

Templates use the structure spec grammar of :mod:`valband.structure.specs` with the
placeholders ``{composition}`` (e.g. ``Cu0.75Pd0.25``; elements with fraction 0 dropped),
``{element}`` (the majority element), ``{A}``, ``{B}``, ``{C}`` (the system's elements in
order) and ``{seed}`` (the candidate's seed). A system without ``elements`` lists plain specs
(``"slab Pt fcc111 layers=5"``, ``"overlayer Pd/Cu fcc111 layers=5"``, ``"Cu3Pd L12"``).
Each strain appends ``strain=E`` (or ``biaxial=E``) to the spec, so a template must not carry
its own strain option.

Candidates and seeds
    Every (grid point, structure template, strain) of a system is a candidate; identical
    calculations listed twice are run once. A candidate's inputs (spec, composition, strain,
    parameter set with its file hash, method and settings, descriptors, spectra) are hashed;
    its seed is derived from the campaign seed and that hash (SHA-256, 31 bits), substituted
    for ``{seed}`` (structure randomness) and used by KPM for its random vectors, and stored
    with the row. The candidate key hashes the inputs including the seed.

Results
    :mod:`valband.campaign.database` (SQLite layout, fingerprint, resume),
    :mod:`valband.campaign.export` (CSV columns), :mod:`valband.campaign.plots` (figures).

Examples of our own invention: ``examples/campaigns/``.
"""

from valband.campaign.schema import CAMPAIGN_SCHEMA, METHODS, Campaign, Candidate

__all__ = ["CAMPAIGN_SCHEMA", "METHODS", "Campaign", "Candidate", "load_campaign",
           "parse_campaign", "run_campaign", "RunSummary", "ResultsDB", "read_rows",
           "export_csv", "plot_campaign", "make_executor", "LocalExecutor", "DaskExecutor",
           "SerialExecutor", "evaluate"]


def __getattr__(name: str):
    """Lazy access, so worker processes import only what they use."""
    import importlib

    where = {
        "load_campaign": "schema", "parse_campaign": "schema", "run_campaign": "runner",
        "RunSummary": "runner", "ResultsDB": "database", "read_rows": "database",
        "export_csv": "export", "plot_campaign": "plots", "make_executor": "executors",
        "LocalExecutor": "executors", "DaskExecutor": "executors",
        "SerialExecutor": "executors", "evaluate": "task",
    }
    if name in where:
        return getattr(importlib.import_module(f"valband.campaign.{where[name]}"), name)
    raise AttributeError(f"module 'valband.campaign' has no attribute {name!r}")
