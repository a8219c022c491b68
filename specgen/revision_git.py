"""Specs in git: reading a spec as it was in a revision (``PATH@GITREV``) and committing and tagging a release.

Git runs as a subprocess in the spec file's own work tree; every failure is a one-line SpecError.
"""

from __future__ import annotations

import os
import re
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from .errors import SpecError

if TYPE_CHECKING:      # subprocess loads only when git runs
    import subprocess

_SPACES = re.compile(r"\s+")


def run_git(args: Sequence[str], cwd: str | os.PathLike, what: str | None = None
         ) -> subprocess.CompletedProcess:
    import subprocess

    env = dict(os.environ, LC_ALL="C", GIT_TERMINAL_PROMPT="0")
    try:
        return subprocess.run(["git", *args], cwd=cwd, capture_output=True, env=env,
                              timeout=120)
    except FileNotFoundError:
        raise SpecError("git is not installed (needed for FILE@REV and --commit)",
                        file=what) from None
    except subprocess.TimeoutExpired:
        raise SpecError(f"git {args[0]} did not finish within 120 s", file=what) from None


def _git_message(proc: subprocess.CompletedProcess) -> str:
    lines = [ln.strip() for ln in proc.stderr.decode("utf-8", "replace").splitlines()
             if ln.strip() and not ln.startswith("hint:")]
    msg = lines[-1] if lines else proc.stdout.decode("utf-8", "replace").strip()
    return re.sub(r"^(fatal|error): ", "", msg)


def repo_path(path: Path, what: str) -> tuple[str, str]:
    """(work tree top level, path relative to it in POSIX form) for a file that may not exist."""
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise SpecError(f"no such folder '{folder}'", file=what)
    proc = run_git(["rev-parse", "--show-toplevel"], folder, what)
    if proc.returncode != 0:
        raise SpecError("is not inside a git work tree", file=what)
    top = os.path.realpath(proc.stdout.decode("utf-8").strip())
    full = os.path.join(os.path.realpath(folder), path.name)
    rel = os.path.relpath(full, top)
    if rel.startswith(".."):
        raise SpecError("is outside its git work tree", file=what)
    return top, Path(rel).as_posix()


def split_ref(spec_ref: str) -> tuple[str, str | None]:
    """``PATH@GITREV`` -> (PATH, GITREV); a plain path, or an existing file with '@', -> (PATH, None).

    A rev may itself hold '@' (``HEAD@{1}``): the split is at the first '@' whose left side is
    an existing file, else at the first '@'.
    """
    if "@" not in spec_ref or Path(spec_ref).is_file():
        return spec_ref, None
    cuts = [i for i, c in enumerate(spec_ref) if c == "@"]
    cut = next((i for i in cuts if Path(spec_ref[:i]).is_file()), cuts[0])
    return spec_ref[:cut], spec_ref[cut + 1:]


def read_rev(spec_ref: str) -> tuple[str, str]:
    """(display name, text) of a spec given as a path or as ``PATH@GITREV``.

    The git form reads the file as it was in that revision (``git show REV:path``, run in the
    file's repository); the file need not exist in the work tree any more. Not a repository,
    an unknown revision or a file missing from it are SpecErrors of one line.
    """
    from .loading import decode_text, limit_for, read_text, too_big

    path_str, rev = split_ref(str(spec_ref))
    if rev is None:
        return path_str, read_text(path_str, "spec")
    display = f"{path_str}@{rev}"
    if not path_str:
        raise SpecError("expected PATH@GITREV, the path is missing", file=display)
    if not rev:
        raise SpecError("expected PATH@GITREV, the revision after '@' is missing", file=display)
    if rev.startswith("-") or any(c in rev for c in "\n\r\0"):
        raise SpecError(f"'{rev}' is not a git revision", file=display)
    top, rel = repo_path(Path(path_str), display)
    proc = run_git(["rev-parse", "--verify", "--quiet", f"{rev}^{{commit}}"], top, display)
    if proc.returncode != 0:
        raise SpecError(f"unknown git revision '{rev}'", file=display)
    commit = proc.stdout.decode().strip()
    obj = f"{commit}:{rel}"
    proc = run_git(["cat-file", "-t", obj], top, display)
    if proc.returncode != 0:
        raise SpecError(f"{rel} is not in git revision {rev}", file=display)
    if proc.stdout.decode().strip() != "blob":
        raise SpecError(f"{rel} is a folder in git revision {rev}, expected a spec file",
                        file=display)
    limit = limit_for("spec")                # the same limit as a spec read from the work tree
    proc = run_git(["cat-file", "-s", obj], top, display)
    size = int(proc.stdout.decode().strip() or 0) if proc.returncode == 0 else 0
    if size > limit:
        raise SpecError(too_big(size, "spec", limit), file=display)
    proc = run_git(["cat-file", "blob", obj], top, display)
    if proc.returncode != 0:
        raise SpecError(f"git could not read it: {_git_message(proc)}", file=display)
    if len(proc.stdout) > limit:             # the size asked first, checked again on what came back
        raise SpecError(too_big(len(proc.stdout), "spec", limit), file=display)
    return display, decode_text(proc.stdout, display)


def release_tag(part: str, revision: str) -> str:
    """A tag name for a release, e.g. ``BH-1042-rev-B`` (spaces become '-')."""
    return f"{_SPACES.sub('-', str(part).strip())}-rev-{revision}"


def git_commit_and_tag(path: str | os.PathLike, message: str, tag: str) -> str:
    """Commit just this spec file and tag the commit (annotated); never pushes.

    Other changes in the work tree, staged or not, are left out of the commit (``git commit
    -- path`` commits only that path). Refused before anything is done: not a git work tree,
    an invalid or existing tag, no git identity. Returns the new commit's hash.
    """
    p = Path(path)
    what = str(path)
    if not p.is_file():
        raise SpecError("no such spec file", file=what)
    top, rel = repo_path(p, what)
    if not tag or tag.startswith("-") or \
            run_git(["check-ref-format", f"refs/tags/{tag}"], top, what).returncode != 0:
        raise SpecError(f"'{tag}' is not a valid git tag name", file=what)
    if run_git(["rev-parse", "--verify", "--quiet", f"refs/tags/{tag}"], top, what).returncode == 0:
        raise SpecError(f"git tag '{tag}' already exists; a released revision is tagged once",
                        file=what)
    if run_git(["var", "GIT_COMMITTER_IDENT"], top, what).returncode != 0:
        raise SpecError("git does not know who you are: set user.name and user.email",
                        file=what)
    for args in (["add", "--", rel], ["commit", "-q", "-m", message, "--", rel],
                 ["tag", "-a", "-m", message, tag, "HEAD"]):
        proc = run_git(args, top, what)
        if proc.returncode != 0:
            raise SpecError(f"git {args[0]} failed: {_git_message(proc)}", file=what)
    return run_git(["rev-parse", "HEAD"], top, what).stdout.decode().strip()
