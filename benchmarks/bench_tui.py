"""Time the terminal browser on a 10,000-contact workspace (aims: whole network < 1 s, keystrokes p95 < 100 ms).

Run from the project root: ``python benchmarks/bench_tui.py [--contacts N] [--workspace PATH] [--rebuild]``.

Builds (once, then reuses) an invented workspace: N contacts at 400 organisations
(``orgN.example``), small tags shared across organisations, and a calendar of
meetings with you, so that ties, warmth and groups all exist. The analysis is
computed and cached before timing, as it is after any ``mynet import``.

Then, headless (``App.run_test``):

* **first screen**: from creating the app to the groups list drawn with its rows
  (from the cached analysis; the whole network follows in a worker, timed apart);
* **moves**: a key press (row down/up in each list, switching views, opening a
  group and a person, going back) until every widget has handled it, plus one
  full repaint of the screen. Pilot's own idle waits are left out (they are
  reported apart as ``pilot.press`` for comparison).

CPU seconds are printed beside the first screen's wall time: on a busy machine the
wall time grows, the CPU time does not. Prints figures only; asserts nothing.
"""

from __future__ import annotations

import argparse
import asyncio
import random
import statistics
import tempfile
import time
from datetime import date, datetime, timedelta
from pathlib import Path

from textual import events

from mynet.analysis.snapshot import analyse
from mynet.evidence.network import load_network
from mynet.store import Store
from mynet.tui import create_app
from mynet.workspace.importing import import_paths
from mynet.workspace.people import set_me

TODAY = date(2026, 12, 1)
SYLLABLES = ["ka", "lo", "mi", "ren", "sa", "tor", "vel", "yu", "bri", "dan", "fen", "gor", "hal", "is", "jun",
             "ko", "lin", "mar", "nes", "ol", "pra", "qui", "ros", "sel", "tam", "ul", "vin", "wes", "xa", "zor"]


def _word(rng: random.Random, parts: int) -> str:
    return "".join(rng.choice(SYLLABLES) for _ in range(parts)).capitalize()


def write_inputs(folder: Path, n: int, seed: int = 11) -> list[Path]:
    """An invented CSV of ``n`` people and a calendar of meetings with you."""
    rng = random.Random(seed)
    orgs = [f"{_word(rng, 2)} {rng.choice(['Labs', 'Works', 'Partners', 'Systems', 'Freight', 'Studio'])}"
            for _ in range(400)]
    tags = [f"{_word(rng, 2).lower()}-circle" for _ in range(600)]
    rows = ['"Full name","Email","Company","Job title","City","Tags"']
    people = []
    for i in range(n):
        name = f"{_word(rng, 2)} {_word(rng, 3)}"
        o = min(int(rng.paretovariate(1.2)) - 1, 399) if rng.random() < 0.3 else rng.randrange(400)
        email = f"p{i}@org{o}.example"
        tag = rng.choice(tags) if rng.random() < 0.5 else ""
        rows.append(f'"{name}","{email}","{orgs[o]}","Engineer","Town {i % 97}","{tag}"')
        people.append(email)
    csv_path = folder / "people.csv"
    csv_path.write_text("\n".join(rows) + "\n", encoding="utf-8")
    ics = ["BEGIN:VCALENDAR", "VERSION:2.0", "PRODID:-//bench//mynet//EN"]
    start = datetime(2025, 1, 6, 9, 0)
    warm = rng.sample(people, 400)
    for k in range(3000):
        when = start + timedelta(days=rng.randrange(690), hours=rng.randrange(8))
        attendees = rng.sample(warm, rng.choice([1, 1, 2, 3]))
        ics += ["BEGIN:VEVENT", f"UID:bench-{k}@example.org", f"DTSTART:{when:%Y%m%dT%H%M%SZ}",
                f"DTEND:{when + timedelta(hours=1):%Y%m%dT%H%M%SZ}", f"SUMMARY:Catch-up {k}",
                "ORGANIZER:mailto:you@example.org", "ATTENDEE:mailto:you@example.org"]
        ics += [f"ATTENDEE:mailto:{a}" for a in attendees]
        ics.append("END:VEVENT")
    ics.append("END:VCALENDAR")
    ics_path = folder / "calendar.ics"
    ics_path.write_text("\r\n".join(ics) + "\r\n", encoding="utf-8")
    return [csv_path, ics_path]


def build(ws: Path, n: int) -> None:
    t = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        files = write_inputs(Path(tmp), n)
        with Store(ws) as store:
            set_me(store, ["you@example.org"], ["Bench User"])
            import_paths(store, files)
            print(f"imported {len(store.contacts()):,} contacts in {time.perf_counter() - t:.1f} s")
            t = time.perf_counter()
            net = load_network(store, today=TODAY)
            a = analyse(store, net)
            print(f"ties and analysis: {len(net.ties):,} ties, {len(a.groups)} groups in {time.perf_counter() - t:.1f} "
                  f"s")


def _p95(xs: list[float]) -> float:
    """The 95th percentile (nearest rank) of ``xs``."""
    ordered = sorted(xs)
    return ordered[max(0, -(-95 * len(ordered) // 100) - 1)]


ALL_MOVES: list[float] = []


def _ms(xs: list[float]) -> str:
    ALL_MOVES.extend(xs)
    return (f"median {statistics.median(xs) * 1000:6.1f} ms  p95 {_p95(xs) * 1000:6.1f} ms  "
            f"max {max(xs) * 1000:6.1f} ms  (n={len(xs)})")


async def measure(ws: Path, size: tuple[int, int]) -> None:
    t0, c0 = time.perf_counter(), time.process_time()
    app = create_app(ws, today=TODAY, watch_interval=0)
    async with app.run_test(size=size) as pilot:
        lst = app.screen.query_one("#group-list")
        while not lst.rows:
            await asyncio.sleep(0.005)
        app.screen._compositor.render_update(full=True)
        first, first_cpu = time.perf_counter() - t0, time.process_time() - c0
        while app.snapshot is None or app.snapshot.preview:
            await asyncio.sleep(0.005)
        full = time.perf_counter() - t0
        print(f"{size[0]}x{size[1]}  first screen (groups drawn): {first:.2f} s ({first_cpu:.2f} s CPU); "
              f"whole network loaded: {full:.2f} s   "
              f"[{len(app.snapshot.contacts):,} contacts, {len(app.snapshot.net.ties):,} ties, "
              f"{len(app.snapshot.analysis.groups)} groups]")
        while app.snapshot.extras is None:
            await asyncio.sleep(0.02)
        print(f"          duplicates and findings ready in the background after {time.perf_counter() - t0:.2f} s")

        async def key(k: str) -> float:
            start = time.perf_counter()
            app.post_message(events.Key(k, None))
            await pilot._wait_for_screen()
            app.screen._on_timer_update()  # the screen's own update: layout if needed, then the changed lines
            return time.perf_counter() - start

        async def series(label: str, keys: list[str], repeat: int = 1) -> None:
            times = [await key(k) for _ in range(repeat) for k in keys]
            print(f"  {label:<34} {_ms(times)}")

        await series("groups: row down/up", ["down", "up"], 10)
        await series("switch views 1-6 and back", ["2", "3", "4", "5", "6", "1"], 3)
        await pilot.press("3")
        await series("people (all): row down", ["down"], 20)
        await series("people: page down", ["pagedown"], 10)
        await pilot.press("1")
        times = []
        for _ in range(3):
            times.append(await key("enter"))  # open the largest group
            await series("group members: row down", ["down"], 10)
            times.append(await key("enter"))  # open a person
            await app.workers.wait_for_complete()
            await series("person: ties row down", ["down"], 5)
            times.append(await key("escape"))
            times.append(await key("escape"))
        print(f"  {'open group / person, go back':<34} {_ms(times)}")
        await pilot.press("5")
        await series("duplicates: row down", ["down"], 10)
        start = time.perf_counter()
        for _ in range(10):
            await pilot.press("up")
        print(f"  {'(pilot.press, with its idle waits)':<34} {(time.perf_counter() - start) / 10 * 1000:6.1f} ms each")
        moves = list(ALL_MOVES)
        ALL_MOVES.clear()
        print(f"  {'every keystroke above':<34} {_ms(moves)}   (aim: p95 < 100 ms)")
        ALL_MOVES.clear()


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--contacts", type=int, default=10_000)
    ap.add_argument("--workspace", type=Path, default=Path(tempfile.gettempdir()) / "mynet-bench-tui" / "ws.sqlite")
    ap.add_argument("--rebuild", action="store_true")
    args = ap.parse_args()
    ws = args.workspace
    if args.rebuild and ws.exists():
        ws.unlink()
    if not ws.exists():
        ws.parent.mkdir(parents=True, exist_ok=True)
        build(ws, args.contacts)
    with Store(ws) as store:  # the analysis is cached, as after any import
        analyse(store, load_network(store, today=TODAY))
    for size in ((80, 24), (120, 40)):
        asyncio.run(measure(ws, size))


if __name__ == "__main__":
    main()
