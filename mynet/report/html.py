"""The report as one self-contained HTML file.

The page is written as XHTML-style markup that is also well-formed XML (every
element closed, empty ones self-closed, only XML's own entities), so it parses
with :mod:`xml.etree.ElementTree` once the ``<!DOCTYPE html>`` line is
removed. It carries its stylesheet (with a grey-friendly print style) and its
pictures (inline SVG) inside: no script, no font, image or stylesheet from
elsewhere, nothing fetched when it opens. Every text from the data goes
through :func:`html.escape`.
"""

from __future__ import annotations

import html
from typing import Any

from ..analysis.audit import PRIORITY
from ..analysis.groups import group_ref
from .data import ReportData
from .wording import READING_NOTES, SECTIONS, group_roles, headline, num, path_chain, pct, xml_safe

__all__ = ["render_html", "esc", "CSS"]

CSS = """
:root { --ink: #1b1b1b; --muted: #555; --line: #c8c8c8; --soft: #f4f4f4; }
* { box-sizing: border-box; }
body { font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif;
       color: var(--ink); background: #fff; max-width: 1100px; margin: 0 auto; padding: 1.5rem; }
h1 { font-size: 1.8rem; margin: 0 0 .3rem; }
h2 { font-size: 1.3rem; border-bottom: 2px solid var(--ink); padding-bottom: .2rem; margin-top: 2.2rem; }
h3 { font-size: 1.05rem; margin: .2rem 0; }
.meta, figcaption, .remark, .small { color: var(--muted); font-size: .9rem; }
nav ol { columns: 2; padding-left: 1.2rem; }
figure { margin: 1rem 0; }
figure svg { max-width: 100%; height: auto; display: block; }
table { border-collapse: collapse; width: 100%; margin: .6rem 0 1rem; font-size: .9rem; }
th, td { border: 1px solid var(--line); padding: .25rem .45rem; text-align: left; vertical-align: top; }
th { background: var(--soft); }
td.n { text-align: right; font-variant-numeric: tabular-nums; }
ol.findings { padding-left: 1.4rem; }
ol.findings li { margin: .8rem 0; padding: .4rem .7rem; border-left: 6px solid var(--ink); background: var(--soft); }
ol.findings li.sev-medium { border-left-style: dashed; }
ol.findings li.sev-low { border-left-style: dotted; border-left-width: 4px; }
.sev { display: inline-block; font-size: .75rem; font-weight: bold; text-transform: uppercase; letter-spacing: .04em;
       border: 1px solid var(--ink); padding: 0 .35rem; margin-left: .4rem; vertical-align: middle; }
.ask { font-style: italic; }
.path { margin: .5rem 0 .9rem; }
.path ol { margin: .2rem 0; }
dl.reading dt { font-weight: bold; margin-top: .6rem; }
dl.reading dd { margin-left: 1rem; }
.redacted { border: 2px solid var(--ink); padding: .3rem .6rem; display: inline-block; }
@media print {
  body { font-size: 10pt; max-width: none; padding: 0; color: #000; }
  nav { display: none; }
  h2 { page-break-after: avoid; }
  figure, tr, ol.findings li, .path { page-break-inside: avoid; }
  th, ol.findings li { background: none; }
  a { color: #000; text-decoration: none; }
}
"""


def esc(text: Any) -> str:
    """Text from the data, escaped for HTML and stripped of characters XML forbids."""
    return html.escape(xml_safe(text), quote=True)


def _table(headers: list[str], rows: list[list[Any]],
           numeric: set[int] = frozenset()) -> str:  # type: ignore[assignment]
    head = "".join(f"<th>{esc(h)}</th>" for h in headers)
    body = []
    for r in rows:
        cells = "".join(f'<td class="n">{esc(c)}</td>' if i in numeric else f"<td>{esc(c)}</td>"
                        for i, c in enumerate(r))
        body.append(f"<tr>{cells}</tr>")
    return f"<table><thead><tr>{head}</tr></thead><tbody>{''.join(body)}</tbody></table>"


def _findings(d: ReportData) -> str:
    if not d.findings:
        return "<p>Nothing to report yet: import some contacts and interactions first.</p>"
    items = []
    for f in d.findings:
        sev = esc(f.get("severity", "low"))
        mark, words = PRIORITY.get(f.get("severity", "low"), PRIORITY["low"])
        items.append(f'<li class="sev-{sev}"><h3>{esc(f["title"])}<span class="sev">{esc(mark)} {esc(words)}</span>'
                     f'</h3><p>{esc(f["detail"])}</p><p><strong>What to do:</strong> {esc(f["suggestion"])}</p></li>')
    return f'<ol class="findings">{"".join(items)}</ol>'


def _groups(d: ReportData) -> str:
    rows = [[group_ref(g['id']), g["name"] + ("" if g["user_named"] else " (suggested)"), g["size"], g["warm"],
             pct(g["warm_share"]),
             group_roles(g["roles"])] for g in d.groups]
    out = _table(["group", "name", "contacts", "warm", "warm share", "roles"], rows, {2, 3, 4})
    if d.unclustered:
        out += f'<p class="small">{d.unclustered:,} contacts have too few ties to belong to a group.</p>'
    return out


def _brokers(d: ReportData) -> str:
    if not d.brokers:
        return "<p>No contact lies between others yet.</p>"
    rows = [[b["name"], b["role"], d.group_label(b["group"]), num(b["betweenness"], 3), num(b["constraint"]),
             num(b["effective_size"], 1), num(b["participation"]), num(b["warmth"])] for b in d.brokers]
    return _table(["contact", "role", "group", "between others", "closed in", "separate contacts", "spread",
                   "your warmth"],
                  rows, {3, 4, 5, 6, 7})


def _bridges(d: ReportData) -> str:
    if not d.bridges:
        return "<p>No ties between groups.</p>"
    rows = [[b["a_name"], b["b_name"], " - ".join(group_ref(g) for g in b["groups"]), num(b["strength"]),
             num(b["overlap"]), f"yes ({b['span']} steps apart without it)" if b.get("local_bridge") else "no",
             b["ties_between"], b["why"] or "-"]
            for b in d.bridges]
    return _table(["between", "and", "groups", "strength", "shared contacts", "only link", "ties between the groups",
                   "why"],
                  rows, {3, 4, 6})


def _intros(d: ReportData) -> str:
    if not d.intros:
        return "<p>You have warm contacts in every group: no group needs an introduction.</p>"
    out = []
    for it in d.intros:
        out.append(f"<h3>{group_ref(it['group'])} {esc(it['name'])} <span class=\"small\">({it['size']} contacts, "
                   f"{it['warm']} warm)</span></h3>")
        if it["direct"]:
            out.append("<p>You already know " + esc(", ".join(x["name"] for x in it["direct"][:5])) + " there.</p>")
        if not it["paths"]:
            out.append("<p>No chain of at most two people leads there yet.</p>")
            continue
        for p in it["paths"]:
            steps = "".join(f"<li>{esc(s['to_name'])} <span class=\"small\">({num(s['strength'])}: "
                            f"{esc(s['why'] or 'linked')})</span></li>"
                            for s in p["steps"])
            cross = " Crosses groups." if p.get("crosses_groups") else ""
            out.append(f'<div class="path"><strong>{esc(" → ".join(path_chain(p)))}</strong> '
                       f'<span class="small">score {num(p["score"], 3)}.{cross}</span><ol>{steps}</ol>'
                       f'<p class="ask">{esc(p["ask"])}</p></div>')
    return "".join(out)


def _targets(d: ReportData, svg: str | None) -> str:
    t = d.targets
    if not t:
        return ""
    o = t["objective"]
    out = ["<h3>Your targets and the plan</h3>"]
    if svg:
        out.append(f"<figure>{svg}</figure>")
    if t["asks"]:
        out.append(f"<p>Ask {o['people']} {'person' if o['people'] == 1 else 'people'} to open {o['opened']} of your "
                   f"targets, at most {o['capacity']} introductions each:</p><ol>")
        for a in t["asks"]:
            items = "; ".join(f"{esc(x['label'])} ({esc(' → '.join(['you', *x['route']]))}, score "
                              f"{num(x['score'])}{'' if x['basis'] == 'observed' else ', partly assumed'})"
                              for x in a["targets"])
            out.append(f"<li><strong>{esc(a['name'])}</strong> for {items}</li>")
        out.append("</ol>")
    for x in t["no_route"]:
        helps = [f"get back in touch with {', '.join(x['dormant'][:2])}" if x["dormant"] else "",
                 f"nobody warm in {', '.join(x['groups'])}" if x["groups"] else ""]
        helps = [h for h in helps if h]
        out.append(f"<p>No route yet to {esc(x['label'])}" + (f": {esc('; '.join(helps))}." if helps else ".")
                   + "</p>")
    return "".join(out)


def _reading() -> str:
    items = "".join(f"<dt>{esc(t)}</dt><dd>{esc(x)}</dd>" for t, x in READING_NOTES)
    return f'<dl class="reading">{items}</dl>'


def render_html(d: ReportData, svgs: dict[str, Any]) -> str:
    """The whole page.

    Parameters
    ----------
    d : ReportData
    svgs : dict
        ``network`` (svg, caption), ``groups``, ``time`` (or None) and ``tiers`` inline SVG documents.
    """
    s = d.summary
    net_svg, caption = svgs["network"]
    body = {
        "findings": _findings(d),
        "picture": f"<figure>{net_svg}<figcaption>{esc(caption)}</figcaption></figure>"
                   + "".join(f'<p class="remark">{esc(r)}</p>' for r in d.remarks),
        "groups": f"<figure>{svgs['groups']}</figure>{_groups(d)}",
        "time": (f"<figure>{svgs['time']}</figure>" if svgs.get("time")
                 else "<p>No dated meetings or messages imported yet.</p>")
                + f"<figure>{svgs['tiers']}</figure>",
        "brokers": "<p>The people most often on the shortest routes between your other contacts.</p>" + _brokers(d),
        "bridges": "<p>The ties that hold your groups together, the ones that matter most first.</p>" + _bridges(d),
        "intros": "<p>For each group where you have few or no warm contacts: the warmest chains of introductions into "
        "it.</p>"
                  + _intros(d) + _targets(d, svgs.get("targets")),
        "reading": _reading(),
    }
    nav = "".join(f'<li><a href="#{a}">{esc(t)}</a></li>' for a, t in SECTIONS)
    sections = "".join(f'<section id="{a}"><h2>{i}. {esc(t)}</h2>{body[a]}</section>'
                       for i, (a, t) in enumerate(SECTIONS, 1))
    red = ('<p class="redacted"><strong>Redacted copy:</strong> names and addresses are pseudonyms.</p>'
           if d.redacted else "")
    meta = headline(s, len(d.groups), d.generated)
    return (
        "<!DOCTYPE html>\n"
        '<html xmlns="http://www.w3.org/1999/xhtml" lang="en">\n'
        '<head><meta charset="utf-8"/><meta name="viewport" content="width=device-width, initial-scale=1"/>'
        f"<title>Your network, {esc(d.generated)}</title><style>{CSS}</style></head>\n"
        f'<body><header><h1>Your network</h1>{red}<p class="meta">{esc(meta)}</p>'
        f"<nav><ol>{nav}</ol></nav></header>\n{sections}\n"
        '<footer><p class="small">Made with mynet. Everyone in this report is a contact of yours; share it with '
        'care.</p></footer>'
        "</body></html>\n"
    )
