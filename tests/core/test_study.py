"""Study document: round trip, validation, loading safety, atomic saves."""

from __future__ import annotations

import dataclasses
import json
import os

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from core.bands import FR2_PRESETS
from core.resources import demo_studies
from core.study import (
    FORMAT_TAG,
    FORMAT_VERSION,
    BandSpec,
    Candidate,
    CandidateKind,
    Study,
    StudyError,
    Targets,
    dumps_study,
    load_study,
    loads_study,
    save_study,
)
from core.study import io as study_io

# -- strategies: valid studies ------------------------------------------------------------
names = st.text(
    alphabet=st.characters(codec="utf-8", exclude_categories=("Cs", "Cc")), min_size=1, max_size=20
).filter(lambda s: s.strip() != "")


@st.composite
def studies(draw) -> Study:
    base = Study.new()
    n = draw(st.integers(1, 4))
    band_names = draw(st.lists(names, min_size=n, max_size=n, unique=True))
    bands = []
    for name in band_names:
        lo = draw(st.floats(1.0, 90.0, allow_nan=False))
        width = draw(st.floats(0.01, 20.0, allow_nan=False))
        targets = Targets(
            gain_db=draw(st.floats(-20, 60)),
            p1db_dbm=draw(st.floats(-30, 60)),
            pae_pct=draw(st.floats(0, 99.9)),
            input_rl_db=draw(st.none() | st.floats(0, 60)),
        )
        bands.append(BandSpec(name=name, f_low_ghz=lo, f_high_ghz=lo + width, targets=targets))
    cards = base.process_cards
    cands = tuple(
        Candidate(
            name=f"c{i}",
            kind=kind,
            process=draw(st.sampled_from(cards)).name,
            stages=draw(st.none() | st.integers(1, 5)),
        )
        for i, kind in enumerate(draw(st.lists(st.sampled_from(list(CandidateKind)), max_size=4)))
    )
    return dataclasses.replace(base, name=draw(names), bands=tuple(bands), candidates=cands)


@settings(max_examples=60, suppress_health_check=[HealthCheck.too_slow])
@given(studies())
def test_round_trip_save_load_is_exact(tmp_path_factory, study):
    path = tmp_path_factory.mktemp("rt") / "s.json"
    save_study(study, path)
    assert load_study(path) == study


def test_demo_studies_load_and_match_the_scenarios():
    demos = demo_studies()
    assert {"harbour-small-cell", "rural-fwa-terminal"} <= set(demos)
    harbour = load_study(demos["harbour-small-cell"])
    assert [b.name for b in harbour.bands] == ["n257", "n260"]
    assert {c.kind for c in harbour.candidates} == set(CandidateKind)
    assert {b.link.n_elements for b in harbour.bands} == {16}
    rural = load_study(demos["rural-fwa-terminal"])
    assert [b.name for b in rural.bands] == ["n258", "n261", "n259"]


def test_fr2_presets_equal_ts_38_101_2_band_edges():
    # 3GPP TS 38.101-2 Table 5.2-1 (NR operating bands in FR2), edges in GHz; also
    # check-values.md §5 (two sources agree).
    expected = {
        "n257": (26.5, 29.5),
        "n258": (24.25, 27.5),
        "n259": (39.5, 43.5),
        "n260": (37.0, 40.0),
        "n261": (27.5, 28.35),
        "n262": (47.2, 48.2),
    }
    got = {k: (b.f_low_hz / 1e9, b.f_high_hz / 1e9) for k, b in FR2_PRESETS.items()}
    assert got.keys() == expected.keys()
    for k, edges in expected.items():
        assert got[k] == pytest.approx(edges), k
    assert FR2_PRESETS["n257"].f0_hz == pytest.approx(28e9)
    assert FR2_PRESETS["n257"].fractional_bw == pytest.approx(3 / 28)


def _doc(study: Study | None = None) -> dict:
    return json.loads(dumps_study(study or Study.new()))


def _problems(doc: dict) -> list[str]:
    with pytest.raises(StudyError) as info:
        loads_study(json.dumps(doc))
    return [str(p) for p in info.value.problems]


@pytest.mark.parametrize(
    ("mutate", "path", "words"),
    [
        (lambda d: d["bands"][0].update(f_high_ghz=20.0), "bands[0].f_high_ghz", "greater than"),
        (lambda d: d["bands"][0].update(f_low_ghz=-1.0), "bands[0].f_low_ghz", "at least"),
        (lambda d: d["bands"][0].update(f_low_ghz="x"), "bands[0].f_low_ghz", "number"),
        (
            lambda d: d["bands"][0]["targets"].update(pae_pct=120),
            "bands[0].targets.pae_pct",
            "less than",
        ),
        (
            lambda d: d["bands"][0]["link"].update(n_elements=2.5),
            "bands[0].link.n_elements",
            "whole",
        ),
        (
            lambda d: d["bands"][0]["link"].update(polarization="slant"),
            "bands[0].link.polarization",
            "one of",
        ),
        (lambda d: d["bands"].append(dict(d["bands"][0])), "bands[1].name", "duplicates"),
        (
            lambda d: d["candidates"][0].update(process="nope"),
            "candidates[0].process",
            "no process card",
        ),
        (lambda d: d["candidates"][0].update(kind="hybrid"), "candidates[0].kind", "one of"),
        (
            lambda d: d["process_cards"][0].update(v_knee_v=9.0),
            "process_cards[0].v_knee_v",
            "below vdd",
        ),
        (
            lambda d: d["process_cards"].append(dict(d["process_cards"][0])),
            "process_cards[4].name",
            "duplicates",
        ),
        (lambda d: d["cost"].update(design_volume=0), "cost.design_volume", "at least"),
        (lambda d: d.update(bands=[]), "bands", "at least one"),
        (lambda d: d["bands"][0].update(colour="red"), "bands[0].colour", "not a known field"),
        (lambda d: d["bands"][0].update(f_low_ghz=float("inf")), "bands[0].f_low_ghz", "finite"),
        (lambda d: d["estimator"].update(freq_points=True), "estimator.freq_points", "whole"),
        (
            lambda d: d["weights"].update(performance=0, unit_cost=0, dc_power=0, area=0),
            "weights",
            "above zero",
        ),
    ],
)
def test_each_validation_rule_names_the_field(mutate, path, words):
    doc = _doc()
    mutate(doc["study"])
    problems = _problems(doc)
    assert any(p.startswith(path + ":") and words in p for p in problems), problems


def test_several_bad_values_are_all_reported():
    doc = _doc()
    s = doc["study"]
    s["bands"][0]["f_high_ghz"] = 1.0
    s["bands"][0]["targets"]["gain_db"] = "high"
    s["candidates"][0]["process"] = "missing card"
    s["cost"]["scribe_mm"] = -1
    paths = {p.split(":")[0] for p in _problems(doc)}
    assert {
        "bands[0].f_high_ghz",
        "bands[0].targets.gain_db",
        "candidates[0].process",
        "cost.scribe_mm",
    } <= paths


def test_study_error_carries_path_and_reason():
    doc = _doc()
    doc["study"]["bands"][0]["f_high_ghz"] = 1.0
    with pytest.raises(StudyError) as info:
        loads_study(json.dumps(doc))
    assert info.value.path == "bands[0].f_high_ghz"
    assert "greater than f_low_ghz" in info.value.reason


def test_overlapping_bands_warn_but_load():
    study = Study.new()
    n261 = FR2_PRESETS["n261"]
    extra = BandSpec(name="n261", f_low_ghz=n261.f_low_hz / 1e9, f_high_ghz=n261.f_high_hz / 1e9)
    study = dataclasses.replace(study, bands=(*study.bands, extra))
    loaded = loads_study(dumps_study(study))  # no error
    from core.study import check_study

    warnings = [p for p in check_study(loaded) if p.severity == "warning"]
    assert any("overlaps" in w.reason for w in warnings)


def test_newer_version_is_refused_and_older_unknown_too():
    doc = _doc()
    doc["version"] = FORMAT_VERSION + 1
    assert any("newer than this program" in p for p in _problems(doc))
    doc["version"] = 0
    assert any(p.startswith("version:") for p in _problems(doc))
    doc["version"] = FORMAT_VERSION
    doc["format"] = "something.else"
    assert any("not a Bandwright study" in p for p in _problems(doc))
    assert FORMAT_TAG == "bandwright.study"


def test_oversized_and_deeply_nested_files_are_refused_before_parsing(tmp_path, monkeypatch):
    big = tmp_path / "big.json"
    with big.open("wb") as fh:
        fh.truncate(study_io.MAX_FILE_BYTES + 10)
    with pytest.raises(StudyError, match="larger than 20 MB"):
        load_study(big)
    deep = "[" * 100_000 + "]" * 100_000
    calls = []
    monkeypatch.setattr(study_io.json, "loads", lambda *a, **k: calls.append(1))
    with pytest.raises(StudyError, match="nested deeper"):
        loads_study(deep)
    assert calls == []  # refused before json parsing started


def test_missing_and_non_utf8_files(tmp_path):
    with pytest.raises(StudyError, match="file not found"):
        load_study(tmp_path / "absent.json")
    bad = tmp_path / "bad.json"
    bad.write_bytes(b"\xff\xfe\x00garbage")
    with pytest.raises(StudyError, match="UTF-8"):
        load_study(bad)


@pytest.mark.parametrize("fail_at", ["write", "fsync", "replace"])
def test_atomic_save_keeps_the_old_file_on_failure(tmp_path, monkeypatch, fail_at):
    path = tmp_path / "study.json"
    save_study(Study.new(), path)
    before = path.read_bytes()
    changed = dataclasses.replace(Study.new(), name="changed")

    def boom(*_a, **_k):
        raise OSError(28, "No space left on device")

    import core.fileio as fileio

    if fail_at == "write":
        monkeypatch.setattr(fileio, "atomic_write", fileio.atomic_write)  # same function
        real_fdopen = os.fdopen

        class Failing:
            def __init__(self, fh):
                self.fh = fh

            def __enter__(self):
                return self

            def __exit__(self, *exc):
                self.fh.close()

            def write(self, data):
                self.fh.write(data[:10])
                raise OSError(28, "No space left on device")

        monkeypatch.setattr(fileio.os, "fdopen", lambda fd, mode: Failing(real_fdopen(fd, mode)))
    elif fail_at == "fsync":
        monkeypatch.setattr(fileio.os, "fsync", boom)
    else:
        monkeypatch.setattr(fileio.os, "replace", boom)
    with pytest.raises(OSError):
        save_study(changed, path)
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["study.json"]


def test_invalid_study_is_not_saved(tmp_path):
    bad = dataclasses.replace(
        Study.new(), bands=(BandSpec(name="x", f_low_ghz=30.0, f_high_ghz=20.0),)
    )
    with pytest.raises(StudyError, match="f_high_ghz"):
        save_study(bad, tmp_path / "x.json")
    assert not (tmp_path / "x.json").exists()


def _mutations():
    text = dumps_study(Study.new())
    return st.one_of(
        st.integers(0, len(text)).map(lambda n: text[:n]),  # truncated
        st.tuples(st.integers(0, len(text) - 1), st.characters()).map(
            lambda t: text[: t[0]] + t[1] + text[t[0] + 1 :]
        ),  # one character replaced
        st.text(max_size=200),  # random text
        st.recursive(
            st.none() | st.booleans() | st.floats() | st.integers() | st.text(max_size=5),
            lambda inner: (
                st.lists(inner, max_size=4)
                | st.dictionaries(st.text(max_size=5), inner, max_size=4)
            ),
            max_leaves=20,
        ).map(lambda v: json.dumps({"format": FORMAT_TAG, "version": 1, "study": v})),
    )


@settings(max_examples=300, suppress_health_check=[HealthCheck.too_slow])
@given(_mutations())
def test_fuzzed_files_raise_only_study_error(text):
    try:
        loads_study(text)
    except StudyError:
        pass
