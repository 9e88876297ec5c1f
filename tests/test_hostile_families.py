"""A small sample of each hostile family of tests/hostile_families.py (benchmarks/fuzz_campaign.py
--hostile N runs 10,000 cases of each): structural mutants, special files and links, look-alike and
control characters, signals to a --jobs run.  Each case ends in a result or located errors, with no
traceback, no raw control character shown and no file changed that the run read."""

import random

import pytest

from hostile_families import FAMILIES

SAMPLE = {"structural": 12, "unicode": 20, "files": 40, "signals": 1}


@pytest.mark.parametrize("family", sorted(SAMPLE))
def test_a_sample_of_each_hostile_family(family):
    rng = random.Random(f"suite-{family}")
    outcomes = [FAMILIES[family](rng) for _ in range(SAMPLE[family])]
    assert len(outcomes) == SAMPLE[family]


def test_a_link_in_a_loop_is_a_located_error(tmp_path):
    # found by the files family: an include that is a link to itself once ended in an internal
    # error
    from groundcheck import PlanErrors, load

    (tmp_path / "loop.gplan").symlink_to("loop.gplan")
    (tmp_path / "main.gplan").write_text('plan "x"\ninclude "loop.gplan"\n')
    with pytest.raises(PlanErrors) as e:
        load(tmp_path / "main.gplan")
    err = e.value.errors[0]
    assert (err.location.line, err.location.column) == (2, 9) and "link in a loop" in err.message


def test_an_unreadable_plan_with_its_own_name_as_output(cli, tmp_path):
    # found by the files family: a plan that could not be read, -o naming it (or an include it
    # read) with --format json, once ended in a traceback; a dangling link named as both once
    # created its target
    (tmp_path / "m.gplan").symlink_to("/dev/null")
    code, _, err = cli(
        "check", str(tmp_path / "m.gplan"), "--format", "json", "-o", str(tmp_path / "m.gplan")
    )
    assert code == 2 and "refusing to write over" in err and "Traceback" not in err
    (tmp_path / "d.gplan").symlink_to("nowhere.gplan")
    code, _, err = cli(
        "check", str(tmp_path / "d.gplan"), "--format", "json", "-o", str(tmp_path / "d.gplan")
    )
    assert (
        code == 2 and "refusing to write over" in err and not (tmp_path / "nowhere.gplan").exists()
    )


def test_a_ctrl_c_the_interpreter_swallowed_before_our_handler_is_told_from_ours():
    # found by the signals family (1 case in 10,000, reproduced by signalling `python -m
    # groundcheck --version` in its first 120 ms): a Ctrl-C that lands in a module lock's callback
    # while site and the first modules are imported is reported by the interpreter and the run
    # goes on; the command's handler is not yet installed (about 27 ms of start-up, 3 ms of it
    # ours). Any frame of ours past the first steps, or another traceback, is still a failure
    from hostile_families import _before_ours

    swallowed = (
        "Exception ignored in: <function _get_module_lock.<locals>.cb at 0x7f7ba03eb4c0>\n"
        "Traceback (most recent call last):\n"
        '  File "<frozen importlib._bootstrap>", line 198, in cb\n'
        "KeyboardInterrupt: \n"
    )
    assert _before_ours(swallowed)
    later = swallowed.replace("<frozen importlib._bootstrap>", "/x/groundcheck/physics/hum.py")
    assert not _before_ours(later)
    other = 'Traceback (most recent call last):\n  File "/x/groundcheck/cli/a.py"\nValueError\n'
    assert not _before_ours(swallowed + other)
