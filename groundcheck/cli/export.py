"""``groundcheck export``: the plan's ground network in another format (a SPICE netlist), written
by the format registry from the loaded plan."""

from __future__ import annotations

from ..physics.humsettings import PLATE_CURRENTS
from ..renderers.formats import NETLIST_FORMATS
from .common import load_plan, quantity_type, write_output
from .drawing import written_epilog
from .registry import FORMAT, FormatOption, command, opt

__all__ = ["cmd_export"]


@command(
    "export",
    help="write the ground network in another format",
    description="The plan's ground network (each conductor's resistance, inductance and "
    "capacitance) with the hum budget's sources at one frequency (the stated and simulated "
    "currents, each loop's induced EMF in series with the conductor that closes it) and each "
    "stage's reading (a node whose voltage is the drop the stage reads), as a netlist a circuit "
    "simulator reads.\n\n"
    "Example:\n  groundcheck export examples/guitar-head.gplan --frequency 50Hz --source ptx "
    "-o ptx-50.cir",
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
            "--source",
            metavar="NAME",
            help="one source group alone: 'rectifiers' (every rectifier's charging current), "
            "a current's, field source's or heater pair's name (default: every source at the "
            "frequency; groundcheck adds the groups by power, so export each to reproduce its "
            "figures)",
        ),
        opt(
            "--channel",
            metavar="NAME",
            help="the channel whose field directions the loop EMFs take and whose stages are "
            "read (default: the first channel by name)",
        ),
        opt(
            "--plate-current",
            choices=PLATE_CURRENTS,
            default=PLATE_CURRENTS[0],
            help="how a loop's current crosses a chassis plate in the loops' EMFs: resistive "
            "(the default) or inductive, as for check",
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
    plan = load_plan(args.plan)
    # an unknown --source or --channel is an UnknownChoice: one line, exit 2, like any other
    text = NETLIST_FORMATS[args.format].render(
        plan, args.frequency, args.source, args.channel, args.plate_current
    )
    write_output(text, args.output, [args.plan])
    return 0
