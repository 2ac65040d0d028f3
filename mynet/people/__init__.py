"""People: records -> contacts.

Names, addresses and numbers folded alike (``normalise``), the people behind
mail addresses (``correspondence``, ``mailpeople``), identity resolution with
your merge and keep-apart decisions (``identity``) and the refresh that runs
after every import and decision (``refresh``).
"""
