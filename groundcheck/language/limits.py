"""The loader's size limits, in one place (the loader and the plan assembly read them)."""

__all__ = ["LIMITS"]

#: size limits; each breach is a clear error rather than a hang or a memory blow-up
LIMITS = {
    "file_bytes": 16 * 1024 * 1024,
    "line_chars": 4000,
    "include_depth": 16,
    "block_depth": 8,
    "elements": 3_000_000,
    "placed_elements": 200_000,
    "placed_statements": 400_000,
    "rectifiers": 256,
}
