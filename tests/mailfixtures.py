"""Invented mail in the shape of real list traffic, for the list, relay and correspondence tests.

Everyone here is made up; every domain is reserved (``*.example``). The
messages copy the header shapes list servers write (List-Id, List-Post,
List-Unsubscribe, Sender, Precedence, a relay's "Name via List" From with
X-Original-From, a ``user=domain@relay`` From, an archive that adds a token to
each local part), a build robot (Auto-Submitted), a no-reply sender and old
dates (2009-2010).
"""

from __future__ import annotations

LIST = "dev@lists.harbour.example"
LIST_FIELDS = (
    "To: Harbour developers <dev@lists.harbour.example>",
    "List-Id: Harbour developers <dev.lists.harbour.example>",
    "List-Post: <mailto:dev@lists.harbour.example>",
    "List-Help: <mailto:dev-request@lists.harbour.example?subject=help>",
    "List-Unsubscribe: <mailto:dev-request@lists.harbour.example?subject=unsubscribe>",
    "Sender: dev-bounces@lists.harbour.example",
    "Precedence: list",
)
YOU = ("Robin Avenell", "robin@quillon.example")


def message(*headers: str, when: str = "Tue, 2 Mar 2010 10:00:00 +0000", envelope: str = "") -> str:
    env = envelope or "From list-bounce@lists.harbour.example Tue Mar  2 10:00:00 2010"
    return "\n".join([env, *headers, f"Date: {when}"]) + "\n\nbody line\n\n"


def post(author: str, mid: str, subject: str, *, reply_to: str = "", refs: str = "", extra=(), day: int = 2) -> str:
    """One message to the list from ``author`` (``"Name <address>"`` or a full From line)."""
    lines = [author if author.startswith("From:") else f"From: {author}", *LIST_FIELDS,
             f"Subject: {subject}", f"Message-ID: <{mid}>"]
    if reply_to:
        lines.append(f"In-Reply-To: <{reply_to}>")
    if refs:
        lines.append(f"References: {refs}")
    lines.extend(extra)
    return message(*lines, when=f"Tue, {day} Mar 2010 10:00:00 +0000")


def list_mbox() -> bytes:
    """A year of a developers' list as one subscriber's mailbox received it."""
    msgs = [
        # A discussion: Ana asks, you answer, Bo answers you, Ana thanks both.
        post("Ana Lind <ana.lind@quillon.example>", "t1@quillon.example", "Release notes format", day=2),
        post(f"{YOU[0]} <{YOU[1]}>", "t2@quillon.example", "Re: Release notes format",
             reply_to="t1@quillon.example", refs="<t1@quillon.example>", day=3),
        # Bo's mail went through the relay, which rewrote From (X-Original-From keeps the author).
        post('From: "Bo Ek via Harbour developers" <dev@lists.harbour.example>', "t3@lists.harbour.example",
             "Re: Release notes format", reply_to="t2@quillon.example",
             refs="<t1@quillon.example> <t2@quillon.example>", extra=("X-Original-From: Bo Ek <bo@velvane.example>",),
             day=4),
        # Cy's mail: the relay wrote the address in its user=domain form; the thread lost its References.
        post("Cy Moss <cy.moss=corrimont.example@lists.harbour.example>", "t4@lists.harbour.example",
             "Re: Release notes format", reply_to="t3@lists.harbour.example", day=5),
        # An announcement nobody answers.
        post("Di Park <di@harbour.example>", "ann@harbour.example", "[ANN] Harbour 2.0 released", day=6),
        # A build robot's report (RFC 3834 Auto-Submitted), and a reply to it by Di alone.
        post("Harbour CI <jenkins@ci.harbour.example>", "ci1@ci.harbour.example", "Nightly build failed",
             extra=("Auto-Submitted: auto-generated",), day=7),
        post("Di Park <di@harbour.example>", "ci2@harbour.example", "Re: Nightly build failed",
             reply_to="ci1@ci.harbour.example", refs="<ci1@ci.harbour.example>", day=8),
        # Ed writes twice to the list; nobody ever answers him.
        post("Ed Nam <ed@nam.example>", "ed1@nam.example", "Question about ports", day=9),
        # A no-reply notification straight to you.
        message("From: Harbour tracker <noreply@tracker.harbour.example>", f"To: {YOU[1]}",
                "Subject: Issue 12 closed", "Message-ID: <n1@tracker.harbour.example>"),
        # Private mail both ways with Fay, and a one-way sender (Gus writes to you, you never answer).
        message(f"From: {YOU[0]} <{YOU[1]}>", "To: Fay Ro <fay@ro.example>", "Subject: Lunch",
                "Message-ID: <p1@quillon.example>"),
        message("From: Fay Ro <fay@ro.example>", f"To: {YOU[1]}", "Subject: Re: Lunch",
                "Message-ID: <p2@ro.example>", "In-Reply-To: <p1@quillon.example>"),
        message("From: Gus Tam <gus@tam.example>", f"To: {YOU[1]}", "Subject: Offer",
                "Message-ID: <g1@tam.example>"),
    ]
    return "".join(msgs).encode("utf-8")


def archive_mbox() -> bytes:
    """Two threads downloaded from the list's public archive: every address hidden behind a token."""
    return "".join([
        post("Ana Lind <ana.lind-Xk3pQ9Lm@archive.harbour.example>", "a1@archive.harbour.example", "Old question",
             day=10),
        post(f"{YOU[0]} <robin-7Hc2Kq1Z@archive.harbour.example>", "a2@archive.harbour.example",
             "Re: Old question", reply_to="a1@archive.harbour.example", refs="<a1@archive.harbour.example>", day=11),
        post("Bo Ek <bo-Qz81Jd0W@archive.harbour.example>", "a3@archive.harbour.example", "Re: Old question",
             reply_to="a2@archive.harbour.example", refs="<a1@archive.harbour.example>", day=12),
    ]).encode("utf-8")
