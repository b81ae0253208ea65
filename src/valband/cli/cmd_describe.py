"""``valband describe``: d-band (or s/p) descriptors per element and site; files only with --out."""

from __future__ import annotations

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
    """Options of ``valband describe``."""
    add_model_arguments(p)
    add_dos_arguments(p)
    add_method_arguments(p)
    add_output_arguments(p, default_out=None)


def run(args) -> int:
    """Compute and print the descriptor table (and write files if --out is given)."""
    from valband.cli.common import layer_block, load_model_with_info, method_dos, print_layer_table
    from valband.errors import SettingsError
    from valband.jobs import dos_job

    model, info = load_model_with_info(args)
    pre, record = method_dos(args, model, info)
    layers = layer_block(pre, info, args.shell, window_of(args))
    extra = {"method": record} | (
        {"layers": layers.to_dict()} if layers else {})
    summary, dos, table = dos_job(model, dos_settings(args), args.out, window_of(args), args.shell,
                                  args.format, progress=not args.quiet, command="describe",
                                  dos=pre, extra=extra)
    if table is None:
        raise SettingsError(f"{model.structure.formula} has no {args.shell} shell in this parameter set")
    if args.json:
        print_json(summary)
    else:
        print(f"{model.structure.formula}: E_F = {dos.fermi_level:.4f} eV (model scale)")
        print_descriptor_table(table)
        if layers is not None:
            print_layer_table(layers)
    return 0
