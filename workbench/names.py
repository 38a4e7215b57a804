"""Which words a case file may use as a name (a parameter, bound, formula, rate or region).

Why a module of its own: the case-file loader and the rate-region tables both check names, and
neither should import the other for it.
"""

import re

from verifier.text.lexer import KEYWORDS

NAME_RE = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
NOT_NAMES = KEYWORDS | {"min", "max", "Min", "Max", "pos", "abs", "Abs"}   # words the grammar owns
