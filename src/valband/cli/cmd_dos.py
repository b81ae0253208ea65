"""``valband dos``: total and partial DOS, Fermi level and descriptors, written to --out."""

from __future__ import annotations

import sys

from valband.cli.common import (
    add_dos_arguments,
    add_method_arguments,
    add_model_arguments,
    add_output_arguments,
    dos_settings,
    print_descriptor_table,
    print_json,
    window_of,
)


def add_arguments(p) -> None:
    """Options of ``valband dos``."""
    add_model_arguments(p)
    add_dos_arguments(p)
    add_method_arguments(p)
    add_output_arguments(p, default_out="valband-dos")


def run(args) -> int:
    """Compute, write, print."""
    from valband.cli.common import layer_block, load_model_with_info, method_dos, print_layer_table
    from valband.jobs import dos_job

    model, info = load_model_with_info(args)
    pre, record = method_dos(args, model, info)
    layers = layer_block(pre, info, args.shell, window_of(args))
    extra = {"method": record} | (
        {"layers": layers.to_dict()} if layers else {})
    summary, dos, table = dos_job(model, dos_settings(args), args.out, window_of(args), args.shell,
                                  args.format, progress=not args.quiet,
                                  dos=pre, extra=extra)
    if args.json:
        print_json(summary)
    elif not args.quiet:
        print(f"{model.structure.formula}: E_F = {dos.fermi_level:.4f} eV (model scale), "
              f"{dos.n_electrons:g} electrons, DOS(E_F) = {dos.value_at_fermi():.3f} states/eV/cell")
        if table is not None:
            print_descriptor_table(table)
        if layers is not None:
            print_layer_table(layers)
        print(f"wrote {args.out}/", file=sys.stderr)
    return 0
