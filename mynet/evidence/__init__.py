"""Evidence and ties: who knows whom, how well, and why.

Shared meetings and threads (``events``), labels that count (``labels``), the
tie strengths with their observed or assumed basis (``ties``, ``org_limit``),
your warmth to each contact (``warmth``) and the network loaded at one day
(``network``).
"""
