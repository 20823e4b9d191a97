"""Pure edits: apply/revert symmetry, merging, refusal of invalid results."""

from __future__ import annotations

import pytest

from core.edits import (
    Compound,
    EditRefused,
    InsertItem,
    RemoveItem,
    SetField,
    format_path,
    get_in,
    parse_path,
    try_apply,
)
from core.study import BandSpec, Study


def test_set_field_apply_revert_round_trip():
    s = Study.new()
    e = SetField(("bands", 0, "f_high_ghz"), 29.5, 30.0)
    s2 = try_apply(s, e)
    assert s2.bands[0].f_high_ghz == 30.0
    assert e.revert(s2) == s
    assert s.bands[0].f_high_ghz == 29.5  # frozen original untouched


def test_merge_keeps_first_old_and_last_new():
    a = SetField(("bands", 0, "f_high_ghz"), 29.5, 29.6)
    b = SetField(("bands", 0, "f_high_ghz"), 29.6, 29.9)
    m = a.merged(b)
    assert m is not None and (m.old, m.new) == (29.5, 29.9)
    assert a.merged(SetField(("bands", 0, "f_low_ghz"), 26.5, 26.0)) is None


def test_invalid_result_is_refused_with_field_path():
    s = Study.new()
    with pytest.raises(EditRefused) as info:
        try_apply(s, SetField(("bands", 0, "f_high_ghz"), 29.5, 10.0))
    assert info.value.problems[0].path == "bands[0].f_high_ghz"


def test_insert_remove_compound():
    s = Study.new()
    band = BandSpec(name="custom", f_low_ghz=37.0, f_high_ghz=40.0)
    ins = InsertItem("bands", 1, band)
    s2 = try_apply(s, ins)
    assert [b.name for b in s2.bands] == ["n257", "custom"]
    assert ins.revert(s2) == s
    rem = RemoveItem("bands", 1, band)
    assert rem.apply(s2) == s and rem.revert(s) == s2
    both = Compound((ins, SetField(("bands", 1, "name"), "custom", "n260")))
    s3 = both.apply(s)
    assert s3.bands[1].name == "n260" and both.revert(s3) == s


def test_paths_format_and_parse():
    p = ("bands", 1, "targets", "gain_db")
    assert format_path(p) == "bands[1].targets.gain_db"
    assert parse_path("bands[1].targets.gain_db") == p
    assert get_in(Study.new(), ("bands", 0, "name")) == "n257"
