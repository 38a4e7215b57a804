"""Exit status from verdicts: refuted beats unknown beats proved (verifier.core.verdicts.overall)."""

from verifier.core.verdicts import PROVED, REFUTED, UNKNOWN, overall

EXIT_OK, EXIT_REFUTED, EXIT_INPUT, EXIT_UNKNOWN, EXIT_INTERNAL = 0, 1, 2, 3, 4


def exit_code(statuses) -> int:
    statuses = list(statuses)
    if not statuses:
        return EXIT_OK      # nothing was asked (a case file without claims): nothing failed
    return {REFUTED: EXIT_REFUTED, UNKNOWN: EXIT_UNKNOWN, PROVED: EXIT_OK}[overall(statuses)]
