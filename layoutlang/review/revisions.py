"""One side of a comparison: a file on disk, or `REVISION:path` read with `git show`.

Only the `git` command is used (no git library). A path after the colon is read as git reads
it: from the top of the repository, or from the current folder when it starts with `./`.
"""

from __future__ import annotations

import shutil
import subprocess
from dataclasses import dataclass
from pathlib import Path

from ..errors import LayoutFileError
from ..syntax.parser import parse
from .snapshot import Snapshot, snapshot_of

__all__ = ["Side", "read_side", "git_text", "revision_of"]


@dataclass(frozen=True)
class Side:
    """The text of one side, the name messages use for it, and where `use "file"` looks."""

    label: str
    text: str
    base: Path

    def snapshot(self) -> Snapshot:
        """Parse, interpret and evaluate (LayoutError for a script error, naming this side)."""
        return snapshot_of(parse(self.text, self.label), self.base)


def git_text(revision: str, path: str, folder: Path | None = None) -> str:
    """The file `path` as it was in `revision` (`git show REVISION:PATH`, run in `folder`).

    Raises:
        LayoutFileError: git is missing, this is not a repository, or the revision or the
            path does not exist there (git's own words are kept).
    """
    git = shutil.which("git")
    if git is None:
        raise LayoutFileError(f"cannot read {revision}:{path}: the git command is not installed",
                              expected="git on the PATH, or two file paths to compare")
    try:
        done = subprocess.run([git, "show", f"{revision}:{path}"], cwd=folder or None,
                              capture_output=True, timeout=60)
    except (OSError, subprocess.TimeoutExpired) as error:
        raise LayoutFileError(f"cannot run git to read {revision}:{path}: {error}") from None
    if done.returncode != 0:
        said = done.stderr.decode("utf-8", "replace").strip().splitlines()
        reason = said[-1].removeprefix("fatal: ") if said else f"git exited with {done.returncode}"
        raise LayoutFileError(f"cannot read {revision}:{path} from git: {reason}",
                              expected="an existing revision (a branch, tag or commit) and a "
                                       "file in it, e.g. HEAD~1:optics/relay.lay")
    try:
        return done.stdout.decode("utf-8")
    except UnicodeDecodeError:
        raise LayoutFileError(f"{revision}:{path} is not UTF-8 text") from None


def revision_of(spec: str) -> tuple[str, str] | None:
    """('HEAD~1', 'optics/relay.lay') for 'HEAD~1:optics/relay.lay'; None for a plain path."""
    if Path(spec).exists() or ":" not in spec:
        return None
    revision, _, path = spec.partition(":")
    if not revision or not path:
        return None
    return revision, path


def read_side(spec: str) -> Side:
    """A file path, or REVISION:path.

    Raises:
        LayoutFileError: the file cannot be read, or git cannot give the revision's file.
    """
    found = revision_of(spec)
    if found is None:
        path = Path(spec)
        try:
            text = path.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError) as error:
            why = getattr(error, "strerror", None) or error
            raise LayoutFileError(f"cannot read {spec}: {why}",
                                  expected="a layout file, or REVISION:path (e.g. "
                                           "HEAD~1:optics/relay.lay)") from None
        return Side(spec, text, path.parent)
    revision, path = found
    text = git_text(revision, path)
    # `use "file"` in an old revision reads the file as it is now, beside the working copy
    base = Path(path).parent if path.startswith(("./", "../")) else _top() / Path(path).parent
    return Side(spec, text, base)


def _top() -> Path:
    """The top folder of the repository we are in (the current folder if git cannot say)."""
    git = shutil.which("git")
    if git is not None:
        done = subprocess.run([git, "rev-parse", "--show-toplevel"], capture_output=True,
                              timeout=60)
        if done.returncode == 0:
            return Path(done.stdout.decode("utf-8", "replace").strip())
    return Path.cwd()
