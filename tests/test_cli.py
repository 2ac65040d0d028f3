"""End-to-end CLI: import, list, show, merge/unmerge, decisions across re-imports, errors and exit codes."""

from __future__ import annotations

import json
import os
import stat

import pytest

from mynet.cli import main


def run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    return code, out, err


def write(path, text, encoding="utf-8"):
    path.write_bytes(text.encode(encoding))
    return path


STAFF = """Full name,Email,Company,Job title,Tags
Ana Lind,Ana.Lind@quillon.example,Quillon Labs,Engineer,rowing
Tom Reyes,tom@quillon.example,Quillon Labs,Designer,rowing
Bo Ek,bo@velvane.example,Velvane Robotics,CTO,
Robin Vale,you@example.org,Quillon Labs,Lead,
"""

CLUB = """First name;Last name;E-mail;Mobile;Employer
Ána;Lind;ana.lind@QUILLON.example;07700 900123;Quillon
Cara;Moss;cara@post.example;07700 900456;Velvane Robotics
"""


@pytest.fixture
def files(tmp_path):
    return write(tmp_path / "staff.csv", STAFF), write(tmp_path / "club.csv", CLUB, "cp1252")


def test_import_contacts_show_and_json_contract(capsys, files, tmp_path):
    assert run(capsys, "me", "--email", "you@example.org", "--name", "Robin Vale")[0] == 0
    code, out, err = run(capsys, "import", *map(str, files), "--region", "GB", "--json")
    assert code == 0
    report = json.loads(out)
    assert report["records_read"] == 6 and report["contacts_after"] == 4
    assert report["duplicates_merged"] == 1 and report["you_records"] == 1 and report["skipped"] == []
    code, out, _ = run(capsys, "contacts", "--json")
    people = json.loads(out)
    assert {p["name"] for p in people} == {"Ána Lind", "Tom Reyes", "Bo Ek", "Cara Moss"}
    ana = next(p for p in people if p["name"] == "Ána Lind")
    for key in ("id", "name", "emails", "phones", "orgs", "tags", "sources", "warmth", "last_interaction"):
        assert key in ana
    assert ana["emails"] == ["ana.lind@quillon.example"] and ana["phones"] == ["+447700900123"]
    assert ana["sources"] == ["club.csv", "staff.csv"] and ana["orgs"] == ["Quillon Labs"]
    code, out, _ = run(capsys, "contacts", "--search", "velvane", "--json")
    assert {p["name"] for p in json.loads(out)} == {"Bo Ek", "Cara Moss"}
    code, out, _ = run(capsys, "show", "ana lind")
    assert code == 0 and "staff.csv:2" in out and "club.csv:2" in out
    # The workspace is the owner's only.
    assert stat.S_IMODE(os.stat(os.environ["MYNET_WORKSPACE"]).st_mode) == 0o600


def test_reimport_unchanged_is_a_no_op_and_decisions_survive_changes(capsys, files, tmp_path):
    staff, club = files
    run(capsys, "import", str(staff), str(club), "--region", "GB")
    code, out, _ = run(capsys, "contacts", "--json")
    ids = {p["name"]: p["id"] for p in json.loads(out)}
    # Merge two different people by hand, split Ana's records apart.
    code, _, err = run(capsys, "merge", str(ids["Bo Ek"]), str(ids["Cara Moss"]))
    assert code == 1 and "--yes" in err  # different names: not merged without confirmation
    assert run(capsys, "merge", str(ids["Bo Ek"]), str(ids["Cara Moss"]), "--yes")[0] == 0
    code, out, _ = run(capsys, "show", str(ids["Ána Lind"]), "--json")
    rec_ids = [r["id"] for r in json.loads(out)["records"]]
    assert run(capsys, "unmerge", str(ids["Ána Lind"]), "--record", str(rec_ids[1]))[0] == 0
    code, out, _ = run(capsys, "import", str(staff), str(club))
    assert "unchanged" in out
    # Change the staff file: Tom gets a new title, a new person appears.
    write(staff, STAFF.replace("Designer", "Lead designer") + "Dee Olsen,dee@quillon.example,Quillon Labs,QA,\n")
    code, out, _ = run(capsys, "import", str(staff), "--json")
    assert code == 0 and json.loads(out)["files"][0]["status"] == "updated"
    code, out, _ = run(capsys, "contacts", "--json")
    people = json.loads(out)
    names = sorted(p["name"] for p in people)
    assert "Dee Olsen" in names and names.count("Ána Lind") + names.count("Ana Lind") == 2
    merged = [p for p in people if set(p["emails"]) == {"bo@velvane.example", "cara@post.example"}]
    assert len(merged) == 1 and merged[0]["id"] in (ids["Bo Ek"], ids["Cara Moss"])
    tom = next(p for p in people if p["name"] == "Tom Reyes")
    assert tom["id"] == ids["Tom Reyes"] and tom["titles"] == ["Lead designer"]


def test_suggestions_merge_and_apart(capsys, tmp_path):
    a = write(tmp_path / "a.csv", "Name,Email,Company\nAna Lind,ana@home.example,Quillon Labs\n")
    b = write(tmp_path / "b.csv", "Name,Email,Company\n\"Lind, Ana\",alind@other.example,Quillon Labs Ltd\n")
    run(capsys, "import", str(a), str(b))
    code, out, _ = run(capsys, "contacts", "--suggested", "--json")
    sugg = json.loads(out)
    assert len(sugg) == 1 and sugg[0]["score"] == 0.9
    assert run(capsys, "apart", str(sugg[0]["a"]), str(sugg[0]["b"]))[0] == 0
    assert json.loads(run(capsys, "contacts", "--suggested", "--json")[1]) == []
    assert len(json.loads(run(capsys, "contacts", "--json")[1])) == 2


def test_unknown_file_is_refused_and_workspace_unchanged(capsys, files, tmp_path):
    staff, _ = files
    run(capsys, "import", str(staff))
    before = run(capsys, "contacts", "--json")[1]
    junk = tmp_path / "photo.vcf"
    junk.write_bytes(b"\x89PNG\r\n\x1a\n" + bytes(range(256)))
    good = write(tmp_path / "more.csv", "Name,Email\nZed Quist,zed@x.example\n")
    code, out, err = run(capsys, "import", str(good), str(junk))
    assert code == 2 and "photo.vcf" in err
    assert run(capsys, "contacts", "--json")[1] == before
    code, out, err = run(capsys, "import", str(tmp_path / "missing.csv"))
    assert code == 2 and "missing.csv: no such file or directory" in err
    code, out, err = run(capsys, "import", str(good), str(junk), "--skip-bad-files")
    assert code == 2 and "refused" in out and "Zed Quist" in run(capsys, "contacts")[1]


def test_bad_rows_are_skipped_with_line_and_strict_stops(capsys, tmp_path):
    f = write(tmp_path / "rows.csv", "Name,Email,Company\nAna Lind,ana@x.example,Q\n,,Q only\nBo Ek,bo@x.example,V\n")
    code, out, err = run(capsys, "import", str(f), "--json")
    rep = json.loads(out)
    assert code == 0 and rep["records_read"] == 2
    assert [(s["line"], s["file"].endswith("rows.csv")) for s in rep["skipped"]] == [(3, True)]
    os.environ["MYNET_WORKSPACE"] = str(tmp_path / "strict.sqlite")
    code, out, err = run(capsys, "import", str(f), "--strict")
    assert code == 2 and "rows.csv:3" in err
    assert json.loads(run(capsys, "contacts", "--json")[1]) == []


def test_not_found_and_ambiguous(capsys, tmp_path):
    f = write(tmp_path / "p.csv", "Name,Email\nAna Lind,a1@x.example\nAna Lindqvist,a2@y.example\n")
    run(capsys, "import", str(f))
    code, out, err = run(capsys, "show", "Nobody Here")
    assert code == 4 and "no contact matches" in err
    code, out, err = run(capsys, "show", "ana")
    assert code == 4 and "matches 2 contacts" in err
    assert run(capsys, "show", "Ana Lind")[0] == 0  # an exact name wins over partial ones


def test_whole_corpus_imports_or_is_refused_cleanly(capsys, corpus_dir, tmp_path):
    # Every file of the shared corpus (RFC 6350/2426/5545 examples and public parser test files) through the CLI:
    # no traceback, no hang; refused files are named; the rest is stored.
    ws = str(tmp_path / "corpus.sqlite")
    code, out, err = run(capsys, "--workspace", ws, "import", str(corpus_dir), "--skip-bad-files", "--json")
    report = json.loads(out)
    refused = [f for f in report["files"] if f["status"] == "refused"]
    assert code == (2 if refused else 0)
    assert all(f["error"] and f["path"] in f["error"] for f in refused)
    assert report["records_read"] >= 80 and report["contacts_after"] >= 60
    assert "Traceback" not in err
    code, out, err = run(capsys, "--workspace", ws, "ties", "--json")
    assert code == 0 and isinstance(json.loads(out), list)


def test_reach_org_tells_two_contacts_of_one_name_apart(capsys, tmp_path):
    # Two entries named alike (not merged: nothing but the name links them) used to read "Ana Lind, Ana Lind".
    f = write(tmp_path / "people.csv", "Full name,Email,Mobile,Company\nAna Lind,ana@quillon.example,,Quillon Labs\n"
                                       "Ana Lind,,07700 900777,Quillon Labs\nBo Ek,bo@quillon.example,,Quillon Labs\n")
    assert run(capsys, "import", str(f), "--region", "GB")[0] == 0
    people = json.loads(run(capsys, "contacts", "--json")[1])
    ana = sorted(p["id"] for p in people if p["name"] == "Ana Lind")
    assert len(ana) == 2
    code, out, err = run(capsys, "reach", "--org", "Quillon Labs")
    assert code == 0
    listed = next(line for line in out.splitlines() if line.startswith("No path to: ")).split(": ", 1)[1].split(", ")
    assert sorted(listed) == sorted([f"Ana Lind (id {ana[0]})", f"Ana Lind (id {ana[1]})", "Bo Ek"])
    assert "same name" in err


def test_forget_says_which_earlier_files_still_hold_the_person(capsys, files, tmp_path):
    staff, _club = files
    run(capsys, "import", str(staff))
    code, _out, err = run(capsys, "forget", "Bo Ek", "--yes")
    assert code == 0 and "Reports and exports written earlier" in err and "Bo Ek" in err
    assert run(capsys, "export", "-o", str(tmp_path / "net.graphml"))[0] == 0
    assert run(capsys, "report", "-o", str(tmp_path / "net.html"))[0] == 0
    code, out, err = run(capsys, "forget", "Tom Reyes", "--yes")
    assert code == 0 and out.startswith("Forgotten: ")
    assert "may still name Tom Reyes" in err
    assert str((tmp_path / "net.graphml").resolve()) in err and str((tmp_path / "net.html").resolve()) in err
    (tmp_path / "net.html").unlink()  # a file deleted since is not named again
    code, _out, err = run(capsys, "forget", "Ana Lind", "--yes")
    assert str((tmp_path / "net.graphml").resolve()) in err and "net.html" not in err


# ---------------------------------------------------------------- the commands' shape

def all_commands():
    """Every command and subcommand of ``mynet``: (full name, click command)."""
    import click

    from mynet.cli import cli

    out = []

    def walk(group, prefix):
        for name, cmd in sorted(group.commands.items()):
            out.append((f"{prefix} {name}".strip(), cmd))
            if isinstance(cmd, click.Group):
                walk(cmd, f"{prefix} {name}")

    walk(cli, "")
    return out


def test_every_command_and_subcommand_has_help_text():
    commands = all_commands()
    assert {"import", "contacts", "groups name", "tags ignore", "reach", "browse"} <= {n for n, _ in commands}
    for name, cmd in commands:
        assert (cmd.help or "").strip(), f"mynet {name} has no help text"
        assert (cmd.get_short_help_str() or "").strip(), f"mynet {name} has no short help"
        for param in cmd.params:
            if param.param_type_name == "option" and not getattr(param, "hidden", False):
                assert param.help, f"mynet {name} {param.opts[0]} has no help"


def test_every_command_is_a_module_level_function_of_its_family():
    """Commands are importable one by one: each is a module-level object of a mynet.cli module, listed in COMMANDS."""
    import importlib

    from mynet.cli import FAMILIES, cli

    listed = {cmd.name: family for family in FAMILIES for cmd in family.COMMANDS}
    assert set(listed) == set(cli.commands)
    for name, cmd in cli.commands.items():
        module = importlib.import_module(cmd.callback.__module__)
        assert module is listed[name], name
        assert getattr(module,
                       cmd.callback.__name__) is cmd, f"{name} is not a module-level command of {module.__name__}"


def test_every_command_function_is_short():
    """The logic lives in the workspace; a command reads options, calls it and prints (about 60 lines at most)."""
    import inspect

    for name, cmd in all_commands():
        lines, _start = inspect.getsourcelines(cmd.callback)
        body = [ln for ln in lines if ln.strip() and not ln.lstrip().startswith("@")]
        assert len(body) <= 62, f"mynet {name}: {len(body)} lines"
