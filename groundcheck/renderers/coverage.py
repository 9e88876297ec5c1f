"""What a channel's hum figure covers, in words: one sentence shared by the text, HTML and live
reports (the figures come from :func:`groundcheck.physics.supplyhum.coverage`)."""

from __future__ import annotations

__all__ = ["coverage_words"]


def coverage_words(covers: dict) -> str:
    """One sentence on what a channel's hum figure covers, for the reports.

    Parameters:
        covers: :func:`coverage`'s dict.
    Returns:
        the sentence, without a final full stop.
    References:
        none (presentation).
    """
    carried = "the ground system and stray fields"
    left = "; ".join(
        f"{r['rectifier']} {r['ripple_pp_v']:.4g} Vpp on its {r['rail']}"
        for r in covers["rails_left_out"]
    )
    if not covers["fed"]:
        said = f"covers the hum carried by {carried}; supply ripple is not included"
        return said + (f" ({left})" if left else "")
    fed = "; ".join(
        f"{f['stage']}, fed from {f['rectifier']}'s {f['rail']}, rejection "
        f"{f['rejection_db']:g} dB"
        for f in covers["fed"]
    )
    said = f"covers the hum carried by {carried}, and the supply ripple of {fed}"
    if covers["not_fed"]:
        said += "; not the supply ripple of " + ", ".join(covers["not_fed"])
    if left:
        said += f"; rails no stage is fed from: {left}"
    return said
