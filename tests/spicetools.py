"""Running the ngspice circuit simulator on a netlist and reading node voltages back (tests
only)."""

from __future__ import annotations

import subprocess
import tempfile
from pathlib import Path


def run(netlist: str, control: str, timeout: float = 120) -> dict[str, complex]:
    """Run ngspice in batch mode with ``control`` commands; returns every printed vector.

    ``control`` must print with ``print all > OUT`` (OUT is replaced by the output file).
    """
    with tempfile.TemporaryDirectory() as d:
        out = Path(d) / "out.txt"
        body = netlist.replace(".end\n", "")
        body = "\n".join(line for line in body.splitlines() if not line.startswith((".op", ".ac")))
        text = (
            body
            + "\n.control\nset numdgt=12\n"
            + control.replace("OUT", str(out))
            + "\n.endc\n.end\n"
        )
        cir = Path(d) / "net.cir"
        cir.write_text(text)
        subprocess.run(
            ["ngspice", "-b", str(cir)], capture_output=True, timeout=timeout, check=False
        )
        values: dict[str, complex] = {}
        for line in out.read_text().splitlines():
            if "=" not in line:
                continue
            name, val = (s.strip() for s in line.split("=", 1))
            parts = [float(x) for x in val.split(",")]
            values[name.lower()] = complex(parts[0], parts[1] if len(parts) > 1 else 0.0)
        return values
