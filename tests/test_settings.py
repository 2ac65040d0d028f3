"""Settings: one typed schema, checked when a value is set and when it is read."""

from __future__ import annotations

import json
from dataclasses import fields

import pytest

from mynet.analysis.snapshot import AnalysisModel
from mynet.cli import main
from mynet.evidence.ties import TieModel
from mynet.evidence.warmth import WarmthModel
from mynet.settings import SettingError, SettingsGroup, setting
from mynet.store import Store
from mynet.workspace import settings


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("assignment, message", [
    ("analysis.backend=foo", "analysis.backend takes one of auto, louvain, igraph; got 'foo'"),
    ("analysis.seed=2.7", "analysis.seed takes a whole number at least 0; got '2.7'"),
    ("tie_model.min_strength=5", "tie_model.min_strength takes a number at least 0 and below 1; got '5'"),
    ("tie_model.meeting_scale=0", "tie_model.meeting_scale takes a number above 0; got '0'"),
    ("warmth_model.half_life_days=nan", "warmth_model.half_life_days takes a number above 0; got 'nan'"),
    ("tie_model.broadcast_cap=ten", "tie_model.broadcast_cap takes a whole number at least 2; got 'ten'"),
    ("tie_model.min_strenght=0.1", "unknown setting 'tie_model.min_strenght'; did you mean tie_model.min_strength?"),
    ("webmail_domains=not a domain",
     "webmail_domains takes mail domains such as mail.example; 'not a domain' is not one"),
    ("org_aliases=QL", "org_aliases: an alias is written ALIAS=NAME, got 'QL'"),
])
def test_bad_values_are_refused_with_a_clear_message(capsys, tmp_path, assignment, message):
    ws = str(tmp_path / "ws.sqlite")
    code, out, err = run(capsys, "--workspace", ws, "settings", assignment)
    assert code == 2 and out == ""
    assert err.startswith(f"mynet: {message}") and "Traceback" not in err
    code, out, _ = run(capsys, "--workspace", ws, "settings", "--json")
    assert json.loads(out) == json.loads(run(capsys, "--workspace", str(tmp_path / "fresh.sqlite"), "settings",
                                             "--json")[1])


def test_existing_names_still_work_and_are_typed(capsys, tmp_path):
    ws = str(tmp_path / "ws.sqlite")
    for a in ("tie_model.broadcast_cap=40", "analysis.seed=7", "analysis.backend=IGraph",
              "warmth_model.half_life_days=90",
              "webmail_domains=mail.example", "webmail_domains=+@Post.Example", "org_aliases=QL=Quillon Labs",
              "org_aliases=+VR=Velvane Robotics"):
        assert run(capsys, "--workspace", ws, "settings", a)[0] == 0
    data = json.loads(run(capsys, "--workspace", ws, "settings", "--json")[1])
    assert data["tie_model"]["broadcast_cap"] == 40 and isinstance(data["tie_model"]["broadcast_cap"], int)
    assert data["analysis"]["seed"] == 7 and data["analysis"]["backend"] == "igraph"
    assert data["warmth_model"]["half_life_days"] == 90.0
    assert data["webmail_domains"] == ["mail.example", "post.example"]
    assert data["org_aliases"] == {"QL": "Quillon Labs", "VR": "Velvane Robotics"}
    store = Store(tmp_path / "ws.sqlite")
    assert AnalysisModel.from_settings(store.setting("analysis")).backend == "igraph"
    assert TieModel.from_settings(store.setting("tie_model")).broadcast_cap == 40


def test_listing_says_what_each_setting_means(capsys, tmp_path):
    ws = str(tmp_path / "ws.sqlite")
    run(capsys, "--workspace", ws, "settings", "analysis.resolution=1.5")
    out = run(capsys, "--workspace", ws, "settings")[1]
    for name, spec in settings.schema().items():
        assert f"{name} = " in out
        assert f"    {spec.meaning}; {spec.accepts()}" in out
    assert "analysis.resolution = 1.5   (default 1.0)" in out


def test_one_schema_covers_every_model_field_and_one_reader():
    specs = settings.schema()
    for cls in (TieModel, WarmthModel, AnalysisModel):
        assert issubclass(cls, SettingsGroup)
        assert cls.from_settings.__func__ is SettingsGroup.from_settings.__func__  # the one reader
        for f in fields(cls):
            spec = specs[f"{cls.group}.{f.name}"]
            assert spec.meaning and spec.default == f.default
            assert spec.check(f.default) == f.default  # every default is a value its own setting accepts
    assert {"webmail_domains", "org_aliases"} <= set(specs)


def test_a_bad_stored_value_is_reported_not_a_traceback(capsys, tmp_path):
    # A value stored before settings were checked (or edited by hand) stops the analysis with a message.
    ws = tmp_path / "ws.sqlite"
    (tmp_path / "p.csv").write_text("Name,Company\nAna Lind,Quillon Labs\nBo Ek,Quillon Labs\n", encoding="utf-8")
    assert run(capsys, "--workspace", str(ws), "import", str(tmp_path / "p.csv"))[0] == 0
    store = Store(ws)
    store.set_setting("analysis", {"backend": "foo", "seed": 2.7})
    store.close()
    code, out, err = run(capsys, "--workspace", str(ws), "groups")
    assert code == 2 and "Traceback" not in err
    assert ("the stored analysis.seed takes a whole number at least 0; got 2.7; "
            "change it with mynet settings analysis.seed=VALUE") in err
    assert run(capsys, "--workspace", str(ws), "settings", "analysis.seed=2")[0] == 0
    assert run(capsys, "--workspace", str(ws), "settings", "analysis.backend=auto")[0] == 0
    assert run(capsys, "--workspace", str(ws), "groups")[0] == 0


def test_a_new_setting_is_one_declaration():
    from dataclasses import dataclass

    @dataclass
    class Extra(SettingsGroup):  # no group: not registered, but read the same way
        group = "extra"
        clique_limit: int = setting(12, "largest meeting counted as a clique", low=2)
        mode: str = setting("plain", "how to count", choices=("plain", "graded"))
        strict: bool = setting(False, "stop at the first problem")

    assert Extra.from_settings({"clique_limit": 20, "mode": "graded", "strict": True}) == Extra(20, "graded", True)
    with pytest.raises(SettingError, match="extra.clique_limit takes a whole number at least 2"):
        Extra.from_settings({"clique_limit": 1})
    spec = Extra.specs()["strict"]
    assert spec.parse("yes") is True and spec.parse("off") is False
    with pytest.raises(SettingError, match="extra.strict takes yes or no"):
        spec.parse("maybe")
