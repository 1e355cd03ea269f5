"""The FEMA 352 and FEMA 306 tables as data: loading, replacing, refusing a bad file; the t
quantile of the sample statistic; the capacity assumptions' own checks."""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest
from pydantic import ValidationError
from scipy import stats

from triage.assess.stats import beta_inc, t_cdf, t_quantile
from triage.standards import HERE, load, with_tables


def _raw(name: str) -> str:
    return (HERE / name).read_text(encoding="utf-8")


def test_tables_are_loaded_and_cited_from_memory() -> None:
    std = load()
    cites = std.sources()
    assert any(c.startswith("FEMA 352") and c.endswith("from memory") for c in cites)
    assert any(c.startswith("FEMA 306") and c.endswith("from memory") for c in cites)


def test_with_tables_reads_another_file(tmp_path: Path) -> None:
    text = _raw("fema352_connections.toml").replace(
        '[types.G4]\nfamily = "G"\nindex = 8.0', '[types.G4]\nfamily = "G"\nindex = 9.0')
    p = tmp_path / "steel.toml"
    p.write_text(text, encoding="utf-8")
    std = with_tables(load(), steel=p)
    assert std.steel.types["G4"].index == 9.0
    assert load().steel.types["G4"].index == 8.0   # the loaded tables are untouched
    w = tmp_path / "walls.toml"
    w.write_text(_raw("fema306_walls.toml").replace(
        "heavy = { k = 0.5, q = 1.0, d = 0.9 }", "heavy = { k = 0.5, q = 0.95, d = 0.9 }", 1),
        encoding="utf-8")
    std = with_tables(load(), walls=w)
    assert std.walls.components["concrete_wall"].modes["rocking"].heavy.q == 0.95


@pytest.mark.parametrize(("name", "old", "new", "said"), [
    ("fema352_connections.toml", 'index = 8.0\ndescription = "girder flange cracked through, '
     'beyond', 'index = 11.0\ndescription = "girder flange cracked through, beyond',
     "less than or equal to 10"),
    ("fema352_connections.toml", "[types.W5]\nfamily = \"W\"", "[types.W5]\nfamily = \"G\"",
     "starts with its family"),
    ("fema352_connections.toml", "index = 6.0\nrecalled = [5.0, 6.0]",
     "index = 5.0\nrecalled = [5.0, 6.0]", "takes the higher"),
    ("fema306_walls.toml", "crack_mm = [1.5, 3.1, 6.3]", "crack_mm = [3.1, 1.5, 6.3]",
     "crack bounds rise"),
    ("fema306_walls.toml", "moderate = { k = 0.6, q = 0.9, d = 1.0 }",
     "moderate = { k = 0.6, q = 1.1, d = 1.0 }", "less than or equal to 1"),
    ("fema306_walls.toml", "heavy = { k = 0.5, q = 0.8, d = 0.9 }",
     "heavy = { k = 0.5, q = 0.95, d = 0.9 }", "never rises with severity"),
    ("fema306_walls.toml", "[components.urm_pier.modes.rocking]",
     "[components.urm_pier.modes.wobble]", "is not one of"),
])
def test_a_bad_table_file_is_refused_naming_the_rule(tmp_path: Path, name: str, old: str,
                                                     new: str, said: str) -> None:
    text = _raw(name)
    assert old in text
    p = tmp_path / name
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    with pytest.raises(ValidationError, match=said):
        with_tables(load(), **{("steel" if "352" in name else "walls"): p})


def test_fractured_default_type_must_be_in_the_table() -> None:
    std = load()
    bad = std.assumptions.with_overrides(fema352_fractured_type="Z9")
    with pytest.raises(ValidationError, match="fema352_fractured_type"):
        type(std).model_validate({**dict(std), "assumptions": bad})


@pytest.mark.parametrize(("key", "value", "said"), [
    ("fema352_index_levels", {"IO": 5.0, "LS": 4.0, "CP": 7.0}, "IO < LS < CP"),
    ("fema352_class_of_index", {"II": 1.0, "III": 0.5, "IV": 6.0, "V": 10.0}, "II < III"),
    ("fema306_severity_class", {"insignificant": "I", "slight": "III", "moderate": "II",
                                "heavy": "IV", "extreme": "V"}, "lesser class"),
    ("fema306_extreme_lambda", {"k": 0.0, "q": 1.5, "d": 0.0}, "from 0 to 1"),
    ("fema306_grade_bounds", {"slight": 0.8, "light": 0.9, "moderate": 0.6}, "slight > light"),
    ("fema352_min_sample", 1, "greater than or equal to 2"),
])
def test_capacity_assumptions_check_themselves(key: str, value: object, said: str) -> None:
    with pytest.raises(ValidationError, match=said):
        load().assumptions.with_overrides(**{key: value})


def test_every_new_assumption_is_named_with_why_and_status() -> None:
    with open(HERE / "assumptions.toml", "rb") as f:
        raw = tomllib.load(f)
    for key in ("fema352_fractured_type", "fema352_index_levels", "fema352_class_of_index",
                "fema352_min_sample", "fema306_severity_class", "fema306_extreme_lambda",
                "fema306_grade_bounds"):
        assert raw[key]["status"] == "ours" and len(raw[key]["why"]) > 40, key


@pytest.mark.parametrize("df", [1, 2, 3, 4, 7, 19, 60, 500, 20_000])
@pytest.mark.parametrize("p", [0.5, 0.8, 0.9, 0.95, 0.99, 0.999])
def test_t_quantile_against_scipy(df: int, p: float) -> None:
    want = float(stats.t.ppf(p, df))
    assert t_quantile(p, df) == pytest.approx(want, rel=1e-9, abs=1e-9)
    assert t_cdf(want, df) == pytest.approx(p, abs=1e-10)
    assert t_cdf(-want, df) == pytest.approx(1 - p, abs=1e-10)


def test_t_quantile_refuses_outside_its_range() -> None:
    for p, df in ((0.4, 3), (1.0, 3), (0.9, 0)):
        with pytest.raises(ValueError, match="t_quantile"):
            t_quantile(p, df)


def test_beta_inc_ends_and_a_value() -> None:
    assert beta_inc(2.0, 3.0, 0.0) == 0.0
    assert beta_inc(2.0, 3.0, 1.0) == 1.0
    assert beta_inc(2.0, 3.0, 0.4) == pytest.approx(float(stats.beta.cdf(0.4, 2, 3)), abs=1e-12)
    assert beta_inc(2.0, 3.0, 0.9) == pytest.approx(float(stats.beta.cdf(0.9, 2, 3)), abs=1e-12)
