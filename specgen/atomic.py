"""Atomic file writes: a reader sees the old file or the new one, never half of either.

Every output (work-order PDF and HTML, CSV exports, a rewritten spec) goes through here:

- the new content is written to a temporary file in the *same folder* as the target (a rename is
  only atomic within one filesystem), flushed and fsync'ed;
- the temporary file takes the target's permission bits (or the usual ``0o666 & ~umask`` for a new
  file, not the ``0o600`` that :mod:`tempfile` gives);
- ``os.replace`` puts it in place, then the folder is fsync'ed so the rename survives a power cut;
- on any exception the temporary file is removed and the exception re-raised.

A process killed outright (SIGKILL, power loss) cannot clean up after itself: it leaves the old
target untouched plus at most one temporary file per output, named ``.<target name>.<random>.tmp``
(see :data:`TEMP_GLOB`). :func:`clean_stale_temps` removes such leftovers once they are old enough
not to belong to a writer still at work.

Problems of the user's environment (a missing folder, no write permission, a full disk, a
read-only filesystem) become :class:`specgen.errors.SpecError` ``"cannot write: <reason>"`` with
the target as ``file``, so the CLI prints one line and exits 2.

Symbolic links are followed: writing through ``out.pdf -> /shared/out.pdf`` replaces the file the
link points to and keeps the link. File ownership is not carried over (that needs privileges).
"""

from __future__ import annotations

import contextlib
import errno
import os
import tempfile
import time
from collections.abc import Iterator
from pathlib import Path

from specgen.errors import SpecError

#: Shell pattern of the temporary files this module creates (inside the target's folder).
TEMP_GLOB = ".*.tmp"
_TEMP_SUFFIX = ".tmp"
_CHUNK_BYTES = 1 << 20

# Test-only: called with the number of bytes written so far after each chunk of ``write_atomic``.
# The SIGKILL-mid-write test sets it to slow a child writer down; production code never sets it.
_chunk_hook = None

_umask_cache: int | None = None


def _umask() -> int:
    """The process umask, read once (there is no way to read it without briefly setting it)."""
    global _umask_cache
    if _umask_cache is None:
        try:  # Linux exposes it without the set-and-restore race
            with open("/proc/self/status", encoding="ascii") as status:
                for line in status:
                    if line.startswith("Umask:"):
                        _umask_cache = int(line.split()[1], 8)
                        break
        except OSError:
            pass
        if _umask_cache is None:
            current = os.umask(0o022)
            os.umask(current)
            _umask_cache = current
    return _umask_cache


def _target(path: str | os.PathLike) -> Path:
    """The real file to replace: symlinks followed, so the link itself survives."""
    target = Path(path)
    if target.is_symlink():
        target = Path(os.path.realpath(target))
    return target


def _cannot_write(target: Path, err: BaseException) -> SpecError:
    folder = target.parent
    if not folder.is_dir():
        reason = f"folder '{folder}' does not exist"
    elif target.is_dir():
        reason = "it is a folder"
    elif isinstance(err, OSError) and err.errno in (errno.EACCES, errno.EPERM):
        reason = f"no permission to write in '{folder}'"
    elif isinstance(err, OSError) and err.strerror:
        reason = err.strerror[0].lower() + err.strerror[1:]
    else:
        reason = str(err) or type(err).__name__
    return SpecError(f"cannot write: {reason}", file=str(target))


def _new_temp(target: Path) -> Path:
    """Create an empty temporary file beside ``target`` and return its path."""
    try:
        handle = tempfile.NamedTemporaryFile(dir=target.parent or ".", prefix=f".{target.name}.",
                                             suffix=_TEMP_SUFFIX, delete=False)
    except OSError as err:
        raise _cannot_write(target, err) from err
    handle.close()
    return Path(handle.name)


def _final_mode(target: Path) -> int:
    try:
        return os.stat(target).st_mode & 0o7777
    except FileNotFoundError:
        return 0o666 & ~_umask()


def _fsync_file(path: Path) -> None:
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _fsync_folder(folder: Path) -> None:
    """Make the rename durable; not every platform can open a folder, so failure is ignored."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _remove_quietly(path: Path) -> None:
    with contextlib.suppress(OSError):
        os.unlink(path)


def write_atomic(path: str | os.PathLike, data: bytes | str, encoding: str = "utf-8") -> Path:
    """Replace ``path`` with ``data`` atomically; returns the path written.

    ``str`` data is encoded with ``encoding``; text is written as given (no newline translation).
    """
    target = _target(path)
    payload = data.encode(encoding) if isinstance(data, str) else bytes(data)
    temp = _new_temp(target)
    try:
        try:
            with open(temp, "wb") as out:
                view = memoryview(payload)
                for start in range(0, len(view), _CHUNK_BYTES):
                    out.write(view[start:start + _CHUNK_BYTES])
                    if _chunk_hook is not None:
                        out.flush()
                        _chunk_hook(min(start + _CHUNK_BYTES, len(view)))
                out.flush()
                os.fsync(out.fileno())
            os.chmod(temp, _final_mode(target))
            os.replace(temp, target)
        except OSError as err:
            raise _cannot_write(target, err) from err
    except BaseException:
        _remove_quietly(temp)
        raise
    _fsync_folder(target.parent)
    return target


@contextlib.contextmanager
def atomic_paths(*paths: str | os.PathLike) -> Iterator[tuple[Path, ...]]:
    """Write several outputs together: yields one temporary path per target, in order.

    The caller writes each temporary path (for example ``html.write_pdf(tmp_pdf)``). When the block
    finishes without an exception every temporary file is fsync'ed, given its final mode, and
    renamed onto its target in the order given. If the block raises, all temporary files are
    removed and no target is touched. Each rename is atomic; the set is not one transaction, but
    renaming starts only after every output was written, so a failed render never replaces any.
    """
    targets = [_target(p) for p in paths]
    temps: list[Path] = []
    try:
        for target in targets:
            temps.append(_new_temp(target))
        yield tuple(temps)
        for target, temp in zip(targets, temps):
            try:
                _fsync_file(temp)
                os.chmod(temp, _final_mode(target))
            except OSError as err:
                raise _cannot_write(target, err) from err
        for target, temp in zip(targets, temps):
            try:
                os.replace(temp, target)
            except OSError as err:
                raise _cannot_write(target, err) from err
    except BaseException:
        for temp in temps:
            _remove_quietly(temp)
        raise
    for folder in {t.parent for t in targets}:
        _fsync_folder(folder)


def clean_stale_temps(folder: str | os.PathLike, older_than_s: float = 3600.0) -> list[Path]:
    """Remove this module's temporary files left in ``folder`` by a killed writer.

    Only files matching :data:`TEMP_GLOB` and last modified more than ``older_than_s`` seconds ago
    are removed, so a writer still at work keeps its file. Returns the paths removed.
    """
    removed = []
    cutoff = time.time() - older_than_s
    for candidate in Path(folder).glob(TEMP_GLOB):
        try:
            if candidate.is_file() and candidate.stat().st_mtime <= cutoff:
                candidate.unlink()
                removed.append(candidate)
        except OSError:
            continue
    return removed
