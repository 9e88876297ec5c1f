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
#: the rectifiers' time steps (their steady states searched), loop pickups (listed loops × field
#: lines × branches: the EMF columns), the hum budget's solves (frequencies × nodes × columns, a
#: fixed cost a frequency) and the devices' earth paths (devices × points)
LIMITS.update(
    {
        "rectifier_steps": 4096 * 240,
        "loop_pickups": 12_000_000,
        "solve_work": 50_000_000,
        "device_work": 100_000_000,
    }
)
