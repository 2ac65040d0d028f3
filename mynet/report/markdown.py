"""The report as Markdown, its pictures as SVG files in a folder beside it.

``network.md`` refers to ``network_files/picture.svg`` (and ``groups.svg``,
``time.svg``, ``tiers.svg``) by relative links, so the folder can be moved as
a whole and every Markdown viewer that shows local images shows them. Text
from the data is escaped twice over: HTML's special characters become
entities (Markdown passes raw HTML through) and Markdown's own punctuation is
backslash-escaped, so a name can neither inject markup nor break a table.
"""

from __future__ import annotations

import html
import re
from typing import Any

from ..analysis.audit import PRIORITY
from ..analysis.groups import group_ref
from .data import ReportData
from .wording import READING_NOTES, SECTIONS, group_roles, headline, num, path_chain, pct, xml_safe

__all__ = ["render_markdown", "md", "IMAGE_NAMES"]

#: File names of the pictures inside the ``<stem>_files`` folder.
IMAGE_NAMES = {"network": "picture.svg", "groups": "groups.svg", "time": "time.svg", "tiers": "tiers.svg",
               "targets": "targets.svg"}

_MD_SPECIAL = re.compile(r"([\\`*_\[\]|~])")
_MD_LEADING = re.compile(r"^([-+#>=]|\d+[.)])")


def md(text: Any) -> str:
    """Text from the data, safe inside a Markdown paragraph or table cell (one line).

    HTML's special characters become entities; backslash, backtick, ``*``,
    ``_``, brackets, ``|`` and ``~`` are backslash-escaped everywhere, and a
    leading ``-``, ``+``, ``#``, ``>``, ``=`` or ``1.`` that would start a
    list, heading or quote is escaped too.
    """
    t = html.escape(" ".join(xml_safe(text).split()), quote=False)
    t = _MD_SPECIAL.sub(r"\\\1", t)
    return _MD_LEADING.sub(lambda m: m.group(1)[:-1] + "\\" + m.group(1)[-1], t)


def _table(headers: list[str], rows: list[list[Any]]) -> list[str]:
    out = ["| " + " | ".join(md(h) for h in headers) + " |", "|" + "---|" * len(headers)]
    out += ["| " + " | ".join(md(c) for c in r) + " |" for r in rows]
    return out + [""]


def _img(folder: str, key: str, alt: str) -> str:
    return f"![{md(alt)}]({folder}/{IMAGE_NAMES[key]})"


def render_markdown(d: ReportData, captions: dict[str, str], folder: str, *, has_time: bool = True) -> str:
    """The Markdown text; ``folder`` is the relative name of the pictures' folder."""
    s = d.summary
    L: list[str] = ["# Your network", ""]
    if d.redacted:
        L += ["**Redacted copy:** names and addresses are pseudonyms.", ""]
    L += [md(headline(s, len(d.groups), d.generated)), ""]
    titles = dict(SECTIONS)
    n = iter(range(1, len(SECTIONS) + 1))

    def head(key: str) -> None:
        L.extend([f"## {next(n)}. {titles[key]}", ""])

    head("findings")
    for i, f in enumerate(d.findings, 1):
        mark, words = PRIORITY.get(f.get("severity", "low"), PRIORITY["low"])
        L += [f"{i}. **{md(f['title'])}** ({mark} {words})  ", f"   {md(f['detail'])}  ",
              f"   *What to do:* {md(f['suggestion'])}", ""]
    if not d.findings:
        L += ["Nothing to report yet.", ""]
    head("picture")
    L += [_img(folder, "network", "The network: groups as regions, contacts as marks"), "",
          f"*{md(captions['network'])}*", ""]
    L += [md(r) + "\n" for r in d.remarks]
    head("groups")
    L += [_img(folder, "groups", "Contacts and warm contacts per group"), ""]
    L += _table(["group", "name", "contacts", "warm", "warm share", "roles"],
                [[group_ref(g['id']), g["name"] + ("" if g["user_named"] else " (suggested)"), g["size"], g["warm"],
                  pct(g["warm_share"]), group_roles(g["roles"])] for g in d.groups])
    if d.unclustered:
        L += [f"{d.unclustered:,} contacts have too few ties to belong to a group.", ""]
    head("time")
    L += [_img(folder, "time", "Interactions per month") if has_time
          else "No dated meetings or messages imported yet.", ""]
    L += [_img(folder, "tiers", "Contacts by warmth layer"), ""]
    head("brokers")
    if d.brokers:
        L += _table(["contact", "role", "group", "between others", "closed in", "separate contacts", "spread",
                     "your warmth"],
                    [[b["name"], b["role"], d.group_label(b["group"]), num(b["betweenness"], 3), num(b["constraint"]),
                      num(b["effective_size"], 1), num(b["participation"]), num(b["warmth"])] for b in d.brokers])
    else:
        L += ["No contact lies between others yet.", ""]
    head("bridges")
    if d.bridges:
        L += _table(["between", "and", "groups", "strength", "shared contacts", "only link", "ties between the groups",
                     "why"],
                    [[b["a_name"], b["b_name"], " - ".join(group_ref(g) for g in b["groups"]), num(b["strength"]),
                      num(b["overlap"]), f"yes ({b['span']} steps apart without it)" if b.get("local_bridge") else "no",
                      b["ties_between"],
                      b["why"] or "-"] for b in d.bridges])
    else:
        L += ["No ties between groups.", ""]
    head("intros")
    if not d.intros:
        L += ["You have warm contacts in every group: no group needs an introduction.", ""]
    for it in d.intros:
        L += [f"### {group_ref(it['group'])} {md(it['name'])} ({it['size']} contacts, {it['warm']} warm)", ""]
        if it["direct"]:
            L += ["You already know " + md(", ".join(x["name"] for x in it["direct"][:5])) + " there.", ""]
        if not it["paths"]:
            L += ["No chain of at most two people leads there yet.", ""]
        for p in it["paths"]:
            L += [f"- **{md(' → '.join(path_chain(p)))}** (score {num(p['score'], 3)}"
                  + ("; crosses groups" if p.get("crosses_groups") else "") + ")"]
            for st in p["steps"]:
                L.append(f"  - {md(st['to_name'])} ({num(st['strength'])}: {md(st['why'] or 'linked')})")
            L.append(f"  - *{md(p['ask'])}*")
        L.append("")
    if d.targets:
        t = d.targets
        o = t["objective"]
        L += ["### Your targets and the plan", "", _img(folder, "targets", "Targets by score and routes; the plan"),
              ""]
        if t["asks"]:
            L += [f"Ask {o['people']} {'person' if o['people'] == 1 else 'people'} to open {o['opened']} of your "
                  f"targets, at most {o['capacity']} introductions each:", ""]
            for i, a in enumerate(t["asks"], 1):
                L.append(f"{i}. **{md(a['name'])}** for " + "; ".join(
                    f"{md(x['label'])} ({md(' → '.join(['you', *x['route']]))}, score {num(x['score'])}"
                    f"{'' if x['basis'] == 'observed' else ', partly assumed'})" for x in a["targets"]))
            L.append("")
        for x in t["no_route"]:
            helps = [f"get back in touch with {', '.join(x['dormant'][:2])}" if x["dormant"] else "",
                     f"nobody warm in {', '.join(x['groups'])}" if x["groups"] else ""]
            helps = [h for h in helps if h]
            L += [f"No route yet to {md(x['label'])}" + (f": {md('; '.join(helps))}." if helps else "."), ""]
    head("reading")
    for term, text in READING_NOTES:
        L += [f"**{md(term)}.** {md(text)}", ""]
    L += ["---", "", "Made with mynet. Everyone in this report is a contact of yours; share it with care.", ""]
    return "\n".join(L)
