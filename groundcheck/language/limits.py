"""The loader's size limits, in one place (the loader and the plan assembly read them)."""

__all__ = ["LIMITS"]

#: size limits; each breach is a clear error rather than a hang or a memory blow-up
LIMITS = {
    "file_bytes": 16 * 1024 * 1024,
    "line_chars": 4000,
    "include_depth": 16,
    "block_depth": 8,
    "elements": 3_000_000,
    "placed_elements": 20_000,
    "placed_statements": 40_000,
    "include_reads": 256,
    "rectifiers": 256,
}

#: work limits of one analysis, estimated before the work starts (groundcheck/physics/workload.py):
#: the rectifiers' time steps (their steady states searched), the sized field sources' searches
#: (quadrature points × searches), the hum budget's solves (frequencies × nodes × columns, a fixed
#: cost a frequency, the loops' EMF columns at each field line) and the devices' earth paths
#: (devices × points)
LIMITS.update(
    {
        "rectifier_steps": 4096 * 240,
        "field_search": 1_500_000,
        "solve_work": 50_000_000,
        # or this many solves of the whole network, when more (a large plan's work in proportion)
        "solve_columns": 3_000,
        "device_work": 100_000_000,
    }
)
