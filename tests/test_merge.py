"""Two changes to one statement merged into one edit (groundcheck/advice/merge.py): the expected
texts are written out by hand."""

from groundcheck.advice.edits import Edit, apply_edits
from groundcheck.advice.merge import merge_into

HEAD = "mains 230 V 50 Hz, fuse 5 A slow,"
TAIL = "    system TT, electrode 150 ohm"
TEXT = f'plan "p"\n{HEAD}\n{TAIL}\nmetal deck'


def test_two_phrases_added_to_one_statement_become_one_edit():
    rcd = Edit(2, f"{HEAD}\n{TAIL}, rcd 30 mA", (), 3)
    fuse = Edit(2, f"{HEAD[:-1]}, breaking high,\n{TAIL}", (), 3)
    kept, own = merge_into([rcd], (fuse,), TEXT)
    assert own == ()
    assert apply_edits(TEXT, kept) == (
        'plan "p"\nmains 230 V 50 Hz, fuse 5 A slow, breaking high,\n'
        "    system TT, electrode 150 ohm, rcd 30 mA\nmetal deck"
    )


def test_two_phrases_added_at_one_place_keep_the_first_first():
    a = Edit(4, "metal deck, touchable", ())
    b = Edit(4, "metal deck, internal", ())
    kept, _ = merge_into([a], (b,), TEXT)
    assert kept[0].new == "metal deck, touchable, internal"


def test_the_same_words_changed_two_ways_conflict():
    a = Edit(2, "mains 230 V 50 Hz, fuse 2 A slow,\n    system TT, electrode 150 ohm", (), 3)
    b = Edit(2, "mains 230 V 50 Hz, fuse 3 A slow,\n    system TT, electrode 150 ohm", (), 3)
    assert merge_into([a], (b,), TEXT) is None


def test_edits_that_do_not_overlap_pass_through_and_a_removal_never_merges():
    a = Edit(4, "metal deck, touchable", ())
    b = Edit(1, 'plan "q"', ())
    kept, own = merge_into([a], (b,), TEXT)
    assert kept == [a] and own == (b,)
    assert merge_into([a], (Edit(4, None),), TEXT) is None


def test_two_changes_to_one_statement_of_a_device_plan_merge(tmp_path):
    # the thicker protective lead and its stud of its own, both in a placed device's own plan:
    # merged against that file's text as it stands (GC202 had been left after the combined set)
    from groundcheck.advice.edits import Edit
    from groundcheck.advice.merge import merge_into

    dev = tmp_path / "preamp.gplan"
    dev.write_text('plan "p"\nwire pe_lead: mains.pe to psu_pe, 30 mm, 1.0 mm2, protective\n')
    line = "wire pe_lead: mains.pe to psu_pe, 30 mm, 1.0 mm2, protective"
    thicker = Edit(2, line.replace("1.0 mm2", "1.5 mm2"), (), 2, str(dev))
    stud = Edit(2, line.replace("psu_pe,", "pe_stud,"), ("point pe_stud: stud",), 2, str(dev))
    kept, rest = merge_into([thicker], (stud,), 'plan "room"\n')
    assert rest == () and kept[0].new == (
        "wire pe_lead: mains.pe to pe_stud, 30 mm, 1.5 mm2, protective"
    )
    assert kept[0].extra == ("point pe_stud: stud",)
