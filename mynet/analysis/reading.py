"""How to read the results: what each word on the screens means, and the method and sources behind it.

The one place where method names and citations live for a user: ``mynet explain TOPIC`` prints a topic, the
report's "How to read this" section and the browser's help show them all. Every other line of the product
speaks plain words with the numbers beside them and points here.
"""

from __future__ import annotations

from dataclasses import dataclass

from .centrality import ROLE_THRESHOLDS, ROLES

__all__ = ["Topic", "TOPICS", "topic", "topic_names", "ROLE_WORDS", "role_words", "clarity_words"]


@dataclass(frozen=True)
class Topic:
    """One topic: its name (what ``mynet explain`` takes), a title, the plain reading, the method behind it."""

    name: str
    title: str
    plain: str
    words: tuple[tuple[str, str], ...]  # (word on the screens, what it is / its number)
    method: str


_T = ROLE_THRESHOLDS

#: Each role with what it means for you (the rules are in the "roles" topic).
ROLE_WORDS: dict[str, str] = {
    "no ties": "tied to none of your other contacts: known only to you here",
    "centre of a group": "many people in their group know them",
    "centre across groups": "many people in their group know them, and their ties reach other groups too",
    "centre": "many of your contacts know them",
    "go-between": "their ties spread over several groups: news and introductions pass through them",
    "broker": "links people who are otherwise apart: few of their contacts know each other",
    "on the edge": "at the edge of their group, with few ties into it",
    "member": "an ordinary member of their group",
}
assert set(ROLE_WORDS) == set(ROLES)


def role_words(role: str | None) -> str:
    """What a role means, in one line."""
    return ROLE_WORDS.get(role or "", "")


TOPICS: tuple[Topic, ...] = (
    Topic("groups", "Groups",
          "Your contacts fall into groups of people with more ties among themselves than with the rest (a team, "
          "a club, a former employer). Each group keeps its id (G1, G2, ...) and your name for it across "
          "imports; the suggested name comes from what most members share.",
          (("G7", "the group's id, the same on every screen, in the report and in exports"),
           ("group clarity", "how clearly your contacts fall into groups, 0-1 (above 0.3 is clear)"),
           ("warm", "members you are warm with (warmth 0.3 or more)")),
          "Louvain community detection (Blondel, Guillaume, Lambiotte & Lefebvre 2008) on the weighted tie graph, "
          "deterministic (fixed seed); group clarity is the modularity of the split (Newman & Girvan 2004). Ids "
          "are kept by matching each new group to the previous ones by their shared members (Jaccard)."),
    Topic("roles", "Roles",
          "Each person has one role, from their own ties: the first rule that fits. A role changes only when "
          "that person's own position clearly does; a merge or an import elsewhere does not move it.",
          tuple((r, ROLE_WORDS[r]) for r in ROLES),
          f"no ties: degree 0. centre: within-group degree z of {_T['hub_z']} or more (Guimerà & Amaral 2005) and "
          f"{_T['hub_ratio']} times the group's average ties inside it; 'of a group' with participation up to "
          f"{_T['hub_p']}, 'across groups' above. go-between: participation above {_T['gateway_p']} (Guimerà & "
          f"Amaral's non-hub cut-off). broker: betweenness {_T['broker_betweenness']} or more (Freeman 1977, "
          f"Brandes 2001) with Burt's constraint (1992) {_T['broker_constraint']} or less. on the edge: one tie, "
          f"or z of {_T['edge_z']} or less with at most {_T['edge_ratio']} of the group's average ties inside it. "
          f"A person keeps last run's role down to its keep level (z {_T['keep_hub_z']}, participation "
          f"{_T['keep_gateway_p']}, betweenness {_T['keep_broker_betweenness']}, z {_T['keep_edge_z']}) and "
          f"takes another only past its switch level (z {_T['switch_hub_z']}, participation "
          f"{_T['switch_gateway_p']}, betweenness {_T['switch_broker_betweenness']}, z {_T['switch_edge_z']}). "
          "The broker and edge rules and the keep and switch levels are our own rules of thumb."),
    Topic("brokers", "Who holds your network together",
          "The contacts who sit between others: without them some of your contacts would be much further apart.",
          (("between others", "the share of shortest routes between two other contacts that pass through them"),
           ("closed in", "how much their contacts know each other, 0-1 (low: they link people who are apart)"),
           ("separate contacts", "how many of their contacts do not know each other"),
           ("spread", "how evenly their ties spread over groups, 0-1 (0: all in one group)")),
          "between others is betweenness (Freeman 1977, computed with Brandes 2001) over distances 1/strength, "
          "exact up to 5,000 contacts and estimated from sampled sources above (Brandes & Pich 2007); closed in "
          "is Burt's constraint and separate contacts his effective size (Burt 1992); spread is the participation "
          "coefficient (Guimerà & Amaral 2005)."),
    Topic("bridges", "Ties between groups",
          "The ties that link one group to another, the most useful first: few ties between the same two groups, "
          "and ends that share few contacts, which is where new information comes from.",
          (("shared contacts", "the share of the two people's contacts they have in common, 0-1 (low: a bridge)"),
           ("only link", "their ends share no other contact (a local bridge), with how far apart they would be")),
          "Ranked by a rule of our own: strength divided by the number of ties between the same two groups, "
          "doubled for a local bridge. Shared contacts is the neighbourhood overlap of Onnela et al. (2007); "
          "that low-overlap weak ties carry new information is Granovetter's (1973)."),
    Topic("ties", "Ties and what they rest on",
          "A tie says two of your contacts probably know each other, and why. 'Seen' ties rest on something that "
          "happened (a meeting, a mail thread both wrote in, your own word); 'may know' ties only on something "
          "they share (an employer, a mail domain, a label).",
          (("strength", "0-1, from all the evidence together"),
           ("seen / may know", "observed vs assumed: whether something happened between them")),
          "Meetings and threads weigh each shared event by 1/(participants - 1) (Newman 2001); the evidence kinds "
          "combine as 1 - the product of (1 - each kind's strength), so several weak reasons add up but never "
          "past 1. Assumed-only links inside large organisations are limited."),
    Topic("warmth", "Warmth",
          "How close you are to a contact, 0-1: from how often and how recently you met or wrote, or your own "
          "rating (mynet rate). Warm means 0.3 or more. Circles of about 5, 15, 50 and 150 people group your "
          "contacts by warmth.",
          (("warm", "warmth 0.3 or more"), ("circle", "the warmest 5, 15, 50 and 150 (a rule of thumb)")),
          "Each interaction counts less with age (a half-life), replies count double, several kinds of contact "
          "(meetings and mail) add up. The 5/15/50/150 layers are a rule of thumb from studies of personal "
          "networks (Dunbar and colleagues), not a measurement."),
    Topic("findings", "Findings",
          "The check-up of your network, most useful first. Each finding says what it saw, the numbers behind "
          "it, and what you could do.",
          (("» act on this", "far from a healthy range and it matters for reaching new people"),
           ("› worth a look", "somewhat off; look when you have time"),
           ("· for context", "how your network is shaped; nothing to do")),
          "The order is a score of our own: how far a figure is from a healthy range, times how much it matters "
          "for reaching new people. Variety is Blau's index (1977) and Shannon's evenness (1948); your own "
          "brokerage is Burt's constraint and effective size with you added (1992)."),
    Topic("shape", "The shape of your network",
          "How close-knit your network is, how clearly it falls into groups, and whether ties stay inside groups.",
          (("close-knit", "how many of a person's contacts know each other, against a random network"),
           ("small world", "far more close-knit than a random network, with routes almost as short"),
           ("ties leaving groups", "-1: all ties inside groups, +1: all between them"),
           ("density", "the share of all possible ties that exist")),
          "close-knit is the clustering coefficient; small world compares clustering and path length with "
          "random networks of the same size (sigma; Watts & Strogatz 1998, Humphries & Gurney 2008); ties "
          "leaving groups is the E-I index (Krackhardt & Stern 1988)."),
    Topic("reach", "Introductions",
          "The warmest chains of people from you to someone you want to meet, each step with its reason and the "
          "ask to make. Someone you already know warmly is only ever the first person you ask.",
          (("score", "0-1: the strengths along the chain multiplied, your warmth first"),),
          "Searched over cost -ln(strength) with at most two people in between by default; the list offers "
          "different people to ask first."),
    Topic("export", "Export files",
          "mynet export writes the network for other tools: GraphML (an open standard), two CSV tables or JSON.",
          (("contacts CSV", "contact_id, name, emails, phones, organisations, past_organisations, titles, tags, "
                            "places, group_id, group_name, role, the measures, warmth, warmth_tier, meetings, "
                            "messages, last_contact"),
           ("ties CSV", "contact_a, contact_b, name_a, name_b, strength, basis (observed or assumed), the amount "
                        "of each kind of evidence, meetings, threads, manual, overlap, between_groups, "
                        "group_a, group_b, evidence"),
           ("JSON", "{\"network\": {...}, \"contacts\": [...], \"ties\": [...]} with the same names")),
          "Measures keep their trade names in the files (betweenness, constraint, effective_size, "
          "participation, within_z, eigenvector, pagerank, clustering); see the topics above."),
)


def clarity_words(modularity: float | None) -> str:
    """How clearly the contacts fall into groups, from the modularity of the split (above 0.3 is clear:
    common practice after Newman & Girvan 2004)."""
    if modularity is None:
        return "not at all (too few ties)"
    if modularity >= 0.5:
        return "very clearly"
    if modularity >= 0.3:
        return "clearly"
    return "only loosely"


def topic_names() -> list[str]:
    return [t.name for t in TOPICS]


def topic(name: str) -> Topic | None:
    """The topic of that name (or the first whose name starts with it), else None."""
    name = name.strip().lower()
    exact = [t for t in TOPICS if t.name == name]
    return (exact or [t for t in TOPICS if t.name.startswith(name)] or [None])[0]
