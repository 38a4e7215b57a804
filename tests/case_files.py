"""Writing a case file for a test: one helper, shared by the test modules that run whole cases."""

import textwrap


def write(tmp_path, text, name="case.toml"):
    """`text` (dedented) as the file `name` under pytest's tmp_path; its path as a string."""
    path = tmp_path / name
    path.write_text(textwrap.dedent(text), encoding="utf-8")
    return str(path)
