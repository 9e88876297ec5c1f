"""``groundcheck export``: the plan's ground network in another format (a SPICE netlist), written
by the format registry from the loaded plan."""

from __future__ import annotations

from ..renderers.formats import NETLIST_FORMATS
from .common import load_plan, quantity_type, write_output
from .drawing import written_epilog
from .registry import FORMAT, FormatOption, command, opt

__all__ = ["cmd_export"]


@command(
    "export",
    help="write the ground network in another format",
    description="The plan's ground network (each conductor's resistance, inductance and "
    "capacitance, and the plan's current sources) as a netlist a circuit simulator reads.\n\n"
    "Example:\n  groundcheck export examples/dual-mono-phono-stage.gplan --format spice -o "
    "ground.cir",
    epilog=written_epilog("the netlist"),
    formats=NETLIST_FORMATS,
    options=(
        opt("plan", metavar="PLAN"),
        FormatOption(
            FORMAT.flags,
            dict(
                help="spice: a plain SPICE netlist, elements named after the plan's conductors "
                "(R, L, C and the plan's current sources; the default)"
            ),
        ),
        opt(
            "--frequency",
            type=quantity_type("frequency", "Hz"),
            metavar="HZ",
            help="an AC netlist at this frequency, printing every node's voltage (default: a DC "
            "operating point)",
        ),
        opt(
            "-o",
            "--output",
            metavar="FILE",
            help="write the netlist to FILE instead of standard output",
        ),
    ),
)
def cmd_export(args) -> int:
    text = NETLIST_FORMATS[args.format].render(load_plan(args.plan), args.frequency)
    write_output(text, args.output, [args.plan])
    return 0
