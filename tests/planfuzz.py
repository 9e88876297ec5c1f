"""A grammar-aware generator of plans for fuzzing: valid plans built from the language's
statements, and mutations of them (deleted, inserted, swapped, truncated text)."""

from __future__ import annotations

from hypothesis import strategies as st

NAMES = ["a", "b", "c", "star", "pe_stud", "gnd", "k1", "sleeve", "res_neg", "ct"]
UNITS_LEN = ["mm", "cm", "m", "in"]


def _num(draw, lo=0.0, hi=500.0):
    return draw(st.sampled_from([0, 1, 2.5, 10, 47, 100, 330, 1e-3, 1e6, -5, lo, hi]))


@st.composite
def statements(draw, points):
    kind = draw(
        st.sampled_from(
            [
                "wire",
                "bolt",
                "shield",
                "lift",
                "switch",
                "trace",
                "current",
                "stage",
                "rectifier",
                "heater",
                "point",
                "field",
                "strap",
            ]
        )
    )
    a, b = draw(st.sampled_from(points)), draw(st.sampled_from(points + ["deck", "mains.pe"]))
    n = draw(st.integers(0, 10**6))
    length = (
        f"{draw(st.sampled_from([0.1, 1, 10, 80, 300, 2000]))} {draw(st.sampled_from(UNITS_LEN))}"
    )
    area = draw(st.sampled_from(["0.5 mm2", "1 mm2", "18 AWG", "AWG 22", "0.05 mm2"]))
    role = draw(st.sampled_from(["protective", "return", "signal", "shield", "bond"]))
    pos = f"at {draw(st.integers(0, 300))},{draw(st.integers(0, 200))}"
    if kind == "wire":
        route = draw(
            st.sampled_from(["", f", via {draw(st.integers(0, 300))},{draw(st.integers(0, 200))}"])
        )
        return f"wire w{n}: {a} to {b}, {length}, {area}, {role}{route}"
    if kind == "bolt":
        return (
            f"bolt f{n}: {a} to deck, contact "
            f"{draw(st.sampled_from(['0 ohm', '0.5 mohm', '10 ohm']))}"
        )
    if kind == "shield":
        return (
            f"shield s{n}: {a} to {b}, {length}, {area}, terminated "
            f"{draw(st.sampled_from(['both', a]))}"
        )
    if kind == "lift":
        return f"lift l{n}: {a} to {b}, 10 ohm, 47 nF"
    if kind == "switch":
        return f"switch sw{n}: {a} to {b}, {draw(st.sampled_from(['open', 'closed']))}"
    if kind == "trace":
        return f"trace t{n}: {a} to {b}, {length}, width 2 mm"
    if kind == "strap":
        return f"strap st{n}: {a} to {b}, {length}, width 5 mm, thickness 1 mm"
    if kind == "current":
        return (
            f"current i{n}: {a} to {b}, "
            f"{draw(st.sampled_from(['1 mA 50 Hz', '0 A', '2 A 100 Hz', '5 mA']))}, "
            f"{draw(st.sampled_from(['return', 'leakage', 'signal']))}"
        )
    if kind == "stage":
        return (
            f"stage g{n}: {a} to {b}, gain {draw(st.sampled_from(['0 dB', '40 dB', '-6 dB']))}, "
            f"channel {draw(st.sampled_from(['left', 'right', 'main']))}"
        )
    if kind == "rectifier":
        return (
            f"rectifier r{n}: {a} to {b}, "
            f"{draw(st.sampled_from(['full-wave', 'bridge', 'half-wave']))}, secondary "
            f"{draw(st.sampled_from(['6.3', '250', '400']))} V, winding "
            f"{draw(st.sampled_from(['0.01', '50', '1000']))} ohm, reservoir "
            f"{draw(st.sampled_from(['1 uF', '100 uF', '10000 uF']))}, load "
            f"{draw(st.sampled_from(['0 mA', '50 mA', '10 kohm']))}"
        )
    if kind == "heater":
        return (
            f"heater h{n}: 6.3 V, 2 A, {draw(st.sampled_from(['ac', 'dc']))}, "
            f"{draw(st.sampled_from(['floating', f'reference {a}']))}"
        )
    if kind == "field":
        return (
            f"field fs{n}: transformer, {pos}, "
            f"{draw(st.sampled_from(['40 uT at 5 cm', '1 T at 1 mm']))}"
        )
    return f"point p{n}: stud, {pos} on deck"


@st.composite
def valid_plans(draw):
    lines = ['plan "fuzz"']
    if draw(st.booleans()):
        lines.append("mains 230 V 50 Hz, fuse 2 A slow, line-conductor 0.75 mm2")
    if draw(st.booleans()):
        lines.append("listening output 2 V, amp-gain 26 dB, speaker 88 dB, distance 3 m")
    lines.append("metal deck: aluminium 2 mm, 300 x 200 mm, touchable")
    points = draw(st.lists(st.sampled_from(NAMES), min_size=1, max_size=6, unique=True))
    for p in points:
        if draw(st.booleans()):
            lines.append(
                f"point {p}: {draw(st.sampled_from(['stud', 'star', 'pad']))}, at "
                f"{draw(st.integers(0, 300))},{draw(st.integers(0, 200))} on deck"
            )
        else:
            lines.append(f"point {p}: pad")
    for _ in range(draw(st.integers(0, 14))):
        lines.append(draw(statements(points)))
    return "\n".join(lines) + "\n"


@st.composite
def mutated_plans(draw):
    text = draw(valid_plans())
    for _ in range(draw(st.integers(1, 4))):
        op = draw(st.sampled_from(["delete", "insert", "swap", "truncate", "duplicate", "bytes"]))
        if not text:
            break
        i = draw(st.integers(0, len(text) - 1))
        if op == "delete":
            j = min(len(text), i + draw(st.integers(1, 8)))
            text = text[:i] + text[j:]
        elif op == "insert":
            text = (
                text[:i]
                + draw(
                    st.sampled_from(
                        [",", ":", '"', "{", "}", "#", "\n", " x ", "1e999", "µ", "\t", "to"]
                    )
                )
                + text[i:]
            )
        elif op == "swap":
            lines = text.split("\n")
            if len(lines) > 2:
                a, b = draw(st.integers(0, len(lines) - 1)), draw(st.integers(0, len(lines) - 1))
                lines[a], lines[b] = lines[b], lines[a]
                text = "\n".join(lines)
        elif op == "truncate":
            text = text[:i]
        elif op == "duplicate":
            lines = text.split("\n")
            k = draw(st.integers(0, len(lines) - 1))
            lines.insert(k, lines[k])
            text = "\n".join(lines)
        else:
            text = text[:i] + draw(st.text(max_size=6)) + text[i:]
    return text


#: values put in place of each number of a plan (the extreme-value grid): zero, signs, the largest
#: and smallest floats, overflow to infinity, subnormals, long digit strings and values just
#: outside a usual range
EXTREMES = (
    "0",
    "-1",
    "-0",
    "1e308",
    "1e309",
    "-1e308",
    "1e-320",
    "4.9e-324",
    "1e-300",
    "1e21",
    "999999999999",
    "0.000000001",
    "6000",
    "-7000",
    "1e6",
    "273",
    "-234.5",
)

#: a number as the language writes it: digits with an optional fraction and exponent, not inside a
#: name
NUMBER = r"(?<![\w.])[+-]?\d+(?:\.\d*)?(?:[eE][+-]?\d+)?(?![\w.])"


def extreme_variants(text: str):
    """(description, plan text) for every number of ``text`` replaced by each value of EXTREMES in
    turn."""
    import re

    for m in re.finditer(NUMBER, text):
        line = text.count("\n", 0, m.start()) + 1
        for v in EXTREMES:
            yield f"line {line}: {m.group(0)} -> {v}", text[: m.start()] + v + text[m.end() :]


def token_mutants(text: str, n: int, seed: int = 1):
    """``n`` mutants of ``text``, each with one token deleted, duplicated, swapped with its
    neighbour or replaced by a token from elsewhere in the plan (tokens: words, numbers,
    punctuation)."""
    import random
    import re

    rng = random.Random(seed)
    spans = [m.span() for m in re.finditer(r"[\w.\-]+|[^\s\w]", text)]
    for _ in range(n):
        i = rng.randrange(len(spans))
        a, b = spans[i]
        op = rng.randrange(4)
        if op == 0:
            yield text[:a] + text[b:]
        elif op == 1:
            yield text[:b] + " " + text[a:b] + text[b:]
        elif op == 2 and i + 1 < len(spans):
            c, d = spans[i + 1]
            yield text[:a] + text[c:d] + text[b:c] + text[a:b] + text[d:]
        else:
            c, d = spans[rng.randrange(len(spans))]
            yield text[:a] + text[c:d] + text[b:]
