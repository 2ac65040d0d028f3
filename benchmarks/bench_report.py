"""Time of the report and the exports on the sample scenario and on generated larger workspaces.

A script, not a test: it prints figures and asserts nothing.

    python benchmarks/bench_report.py              # sample scenario, 2,000 and 2,500 contacts
    python benchmarks/bench_report.py --quick      # sample scenario only

The generated workspaces are imported through the ordinary importers from a
CSV of invented contacts (organisations of Pareto-distributed sizes, a few
tags and places) and an iCalendar file of meetings (mostly within one
organisation, some across), seeded. Seconds are wall-clock of
``write_report`` / ``export_network`` on a workspace whose ties are already
computed and cached (the first, cold run is shown separately), so they measure
the report itself. 2,500 contacts exceeds the 2,000 drawn one by one, so that
run draws the map of groups.
"""

from __future__ import annotations

import argparse
import json
import sys
import tempfile
import time
from datetime import date, timedelta
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from mynet.analysis.snapshot import analyse  # noqa: E402
from mynet.evidence.network import load_network  # noqa: E402
from mynet.report import write_report  # noqa: E402
from mynet.report.export import export_network  # noqa: E402
from mynet.store import Store  # noqa: E402
from mynet.workspace import Workspace  # noqa: E402
from mynet.workspace.importing import import_paths  # noqa: E402
from mynet.workspace.people import set_me  # noqa: E402

SYLLABLES = ("ka lo mi ra ten vo sel dun mar is bel cor fen gal hol jun lin nor pel quin ros tal ul ver wyn yar "
             "zed").split()
YOU = "you@example.org"


def _word(rng, parts: int) -> str:
    return "".join(rng.choice(SYLLABLES, parts)).capitalize()


def generate(folder: Path, n: int, seed: int = 11) -> list[Path]:
    """A contacts CSV and a calendar of meetings for ``n`` invented people."""
    rng = np.random.default_rng(seed)
    n_orgs = max(3, n // 40)
    sizes = rng.pareto(1.6, n_orgs) + 1
    org_of = rng.choice(n_orgs, size=n, p=sizes / sizes.sum())
    orgs = [f"{_word(rng, 2)} {rng.choice(['Labs', 'Systems', 'Freight', 'Health', 'Works'])}" for _ in range(n_orgs)]
    tags = [_word(rng, 2).lower() for _ in range(12)]
    places = [_word(rng, 3) for _ in range(30)]
    rows = ["Name,Email,Company,Tags,City"]
    emails = []
    for i in range(n):
        given, family = _word(rng, 2), _word(rng, 2)
        email = f"{given.lower()}.{family.lower()}{i}@org{org_of[i]}.example"
        emails.append(email)
        tag = tags[rng.integers(len(tags))] if rng.random() < 0.3 else ""
        rows.append(f"{given} {family},{email},{orgs[org_of[i]]},{tag},{places[rng.integers(len(places))]}")
    (folder / "people.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    by_org = [np.nonzero(org_of == o)[0] for o in range(n_orgs)]
    start = date(2025, 3, 1)
    lines = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//mynet bench//EN"]
    for k in range(n // 2):
        o = int(rng.integers(n_orgs))
        pool = by_org[o] if len(by_org[o]) >= 2 and rng.random() < 0.85 else np.arange(n)
        people = rng.choice(pool, size=min(len(pool), int(rng.integers(2, 6))), replace=False)
        day = start + timedelta(days=int(rng.integers(0, 540)))
        lines += ["BEGIN:VEVENT", f"UID:bench-{k}@example.org", "DTSTAMP:20250101T000000Z",
                  f"DTSTART:{day:%Y%m%d}T100000Z", f"SUMMARY:Meeting {k}", f"ORGANIZER:mailto:{YOU}",
                  f"ATTENDEE:mailto:{YOU}", *(f"ATTENDEE:mailto:{emails[p]}" for p in people), "END:VEVENT"]
    lines.append("END:VCALENDAR")
    (folder / "meetings.ics").write_text("\r\n".join(lines) + "\r\n", encoding="utf-8")
    return [folder / "people.csv", folder / "meetings.ics"]


def sample_workspace(folder: Path):
    from mynet.cli.demo import SOURCE_FILES, sample_dir
    from mynet.workspace.settings import update_list_setting

    src = sample_dir()
    truth = json.loads((src / "ground_truth.json").read_text(encoding="utf-8"))
    store = Store(folder / "sample.sqlite")
    set_me(store, truth["you"]["emails"], [truth["you"]["name"]])
    update_list_setting(store, "webmail_domains",
                        ",".join(d for d in truth["personal_email_domains"] if d != "example.org"))
    import_paths(store, [src / f for f in SOURCE_FILES], region="GB")
    return store


def timed(func, *args, **kwargs) -> tuple[float, object]:
    t = time.perf_counter()
    out = func(*args, **kwargs)
    return time.perf_counter() - t, out


def bench(name: str, store, out: Path) -> None:
    cold, _ = timed(lambda: analyse(store, load_network(store)))
    print(f"\n{name}: {len(store.contacts()):,} contacts (ties, warmth and analysis computed in {cold:.2f} s, then "
          f"cached)")
    for label, kwargs, suffix in (("HTML report", {}, "html"), ("HTML report, redacted", {"redact": True}, "html"),
                                  ("Markdown report", {"markdown": True}, "md")):
        steps: list[tuple[str, float]] = []
        t0 = time.perf_counter()
        secs, path = timed(write_report, Workspace.over(store),
                           out / f"{name}-{label.split(',')[0][:4]}{'-r' if kwargs.get('redact') else ''}.{suffix}",
                           progress=lambda s: steps.append((s, time.perf_counter() - t0)), **kwargs)
        marks = [f"{s} {t:.2f}" for s, t in steps]
        print(f"  {label:<24} {secs:6.2f} s  {path.stat().st_size / 1e6:5.2f} MB   (step starts: {', '.join(marks)})")
    for fmt in ("graphml", "csv", "json"):
        secs, paths = timed(export_network, Workspace.over(store), out / f"{name}.{fmt}")
        print(f"  export {fmt:<17} {secs:6.2f} s  {sum(p.stat().st_size for p in paths) / 1e6:5.2f} MB")


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="the sample scenario only")
    args = ap.parse_args(argv)
    with tempfile.TemporaryDirectory(prefix="mynet-bench-report-") as tmp:
        folder = Path(tmp)
        store = sample_workspace(folder)
        bench("sample", store, folder)
        if not args.quick:
            for n in (2000, 2500):
                sub = folder / f"gen{n}"
                sub.mkdir()
                files = generate(sub, n)
                store = Store(sub / "ws.sqlite")
                set_me(store, [YOU], ["You"])
                secs, _ = timed(import_paths, store, files)
                print(f"\n(generated {n:,} contacts; import took {secs:.1f} s)")
                bench(f"generated-{n}", store, sub)
    return 0


if __name__ == "__main__":
    sys.exit(main())
