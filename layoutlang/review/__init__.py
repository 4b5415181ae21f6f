"""Reviewing a change to a layout: what changed in its statements, in every quantity it shows,
and in its expectations. One engine for the interactive session's before → after (one edit)
and for `layoutlang compare` / `check --against` (two revisions of a file under git).

    snapshot.py    a layout evaluated (Program, results, checks; or why it is not complete)
    readings.py    every quantity a layout shows, data-driven from what it reports and expects
    statements.py  statement changes matched by names (insertions, removals, renames)
    engine.py      the before → after comparison (numbers and states)
    render.py      session lines, text, Markdown, JSON
    revisions.py   reading `REV:path` with `git show`
    command.py     the `compare` command and `check --against`
"""
