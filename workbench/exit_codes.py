"""Exit status from verdicts: refuted beats unknown beats proved (a certain failure is news first)."""

EXIT_OK, EXIT_REFUTED, EXIT_INPUT, EXIT_UNKNOWN, EXIT_INTERNAL = 0, 1, 2, 3, 4


def exit_code(statuses) -> int:
    statuses = list(statuses)
    if "refuted" in statuses:
        return EXIT_REFUTED
    if "unknown" in statuses:
        return EXIT_UNKNOWN
    return EXIT_OK
