"""Files in and out: every file interact writes goes through :func:`write_file` or :func:`open_output`, and
user files are read with :func:`read_text` and :func:`loads_toml`.

Reading: UTF-8 with or without a byte-order mark (spreadsheet programs add one); TOML that nests too
deeply or holds an integer too long to convert is a named error, never a traceback.

What it guarantees, for any target path:

- a reader sees the old file or the complete new one, never a part (a
  temporary file in the target's own folder, flushed and synced, then renamed
  over the target; the folder is synced too where the system allows);
- it never writes over a file the same run reads (``inputs``), however the two
  paths are spelled (compared by device and inode, or by resolved path);
- it refuses a target that is not a regular file (a folder, FIFO, device or
  socket) with a one-line error instead of replacing it;
- a read-only file is refused unless ``force`` is given, and then stays
  read-only; an existing file keeps its mode bits (and owner, where allowed),
  a new one gets the usual permissions (0666 less the umask);
- a symbolic link is written through: its target file is replaced and the
  link stays a link;
- the temporary file lies beside the final target, so a target on another
  filesystem than the working folder (or than ``/tmp``) works.

Every failure is an :class:`~interact.errors.InputError` naming the option
(``field``), the path and what went wrong.
"""

from __future__ import annotations

import contextlib
import os
import stat
import tempfile
from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import IO, Any

from .errors import InputError

__all__ = ["check_target", "loads_toml", "open_output", "read_text", "write_file"]

#: the deepest nesting of tables and arrays accepted in a TOML file (scenarios need 4)
MAX_TOML_DEPTH = 32


def read_text(path: str | Path, field: str) -> str:
    """The text of a user's file (UTF-8; a leading byte-order mark is dropped); unreadable: an error naming ``field``."""
    try:
        return Path(path).read_text(encoding="utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError(field, str(path), f"is not UTF-8 text (byte {exc.start}); save it as UTF-8") from None
    except (OSError, ValueError) as exc:
        raise InputError(field, str(path), f"could not be read ({getattr(exc, 'strerror', None) or exc.__class__.__name__})") from None


def loads_toml(text: str, source: str) -> dict[str, Any]:
    """Parse TOML text (a leading byte-order mark is dropped); any failure is an error naming ``source``."""
    import tomllib

    text = text.removeprefix("\ufeff")
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(source, "TOML", f"could not be parsed: {exc}") from None
    except RecursionError:
        raise InputError(source, "TOML", f"nests tables or arrays too deeply; expected at most {MAX_TOML_DEPTH} levels") from None
    except ValueError as exc:  # an integer beyond Python's conversion limit (4,300 digits)
        raise InputError(source, "TOML", f"holds a number that cannot be read ({str(exc).split(':')[0]})") from None
    depth = _depth(data)
    if depth > MAX_TOML_DEPTH:
        raise InputError(source, "TOML", f"nests tables or arrays {depth} levels deep; expected at most {MAX_TOML_DEPTH}")
    return data


def _depth(value: object) -> int:
    """Nesting depth of parsed TOML, without recursion (a deep file must not exhaust the stack here either)."""
    deepest = 0
    stack: list[tuple[object, int]] = [(value, 0)]
    while stack:
        item, level = stack.pop()
        deepest = max(deepest, level)
        if deepest > MAX_TOML_DEPTH:
            return deepest
        if isinstance(item, dict):
            stack.extend((v, level + 1) for v in item.values())
        elif isinstance(item, list):
            stack.extend((v, level + 1) for v in item)
    return deepest


_KINDS = (
    (stat.S_ISDIR, "a folder"),
    (stat.S_ISFIFO, "a named pipe (FIFO)"),
    (stat.S_ISCHR, "a character device"),
    (stat.S_ISBLK, "a block device"),
    (stat.S_ISSOCK, "a socket"),
)


def _final(path: Path) -> Path:
    """``path`` with every symbolic link followed (a dangling link gives the file it names)."""
    try:
        return Path(os.path.realpath(path))
    except (OSError, ValueError):  # pragma: no cover - realpath rarely fails (very long paths)
        return path.absolute()


def _same_file(a: Path, b: Path) -> bool:
    try:
        sa, sb = os.stat(a), os.stat(b)
    except (OSError, ValueError):
        return _final(a) == _final(b)
    return (sa.st_dev, sa.st_ino) == (sb.st_dev, sb.st_ino)


def _reason(exc: OSError) -> str:
    return exc.strerror or exc.__class__.__name__


def check_target(path: str | Path, *, field: str = "--output", inputs: Iterable[str | Path | None] = (), force: bool = False) -> Path:
    """Check that ``path`` may be written; returns the final file (symbolic links followed).

    Raises :class:`InputError` (naming ``field``) when ``path`` is one of
    ``inputs``, is not a regular file, is read-only (unless ``force``) or its
    folder does not exist or cannot be written.
    """
    given = Path(path)
    if str(path) == "":
        raise InputError(field, str(path), "is empty; expected a file name")
    final = _final(given)
    for other in inputs:
        if other is None or str(other) == "" or str(other) == "-":
            continue
        if _same_file(given, Path(other)):
            raise InputError(field, str(path), "is also an input of this run; choose another file so the input is not overwritten")
    try:
        info = os.stat(final)
    except FileNotFoundError:
        info = None
    except (OSError, ValueError) as exc:
        raise InputError(field, str(path), f"cannot be written ({_reason(exc) if isinstance(exc, OSError) else 'bad path'})") from None
    if info is not None:
        for test, kind in _KINDS:
            if test(info.st_mode):
                raise InputError(field, str(path), f"is {kind}; expected a regular file to write")
        # no write bit at all is read-only too: the superuser's access() says yes to every file
        if not force and (not os.access(final, os.W_OK) or not info.st_mode & 0o222):
            raise InputError(
                field,
                str(path),
                "is read-only; it was left unchanged (make it writable, or on the command line pass --force to replace it "
                "and keep it read-only)",
            )
    folder = final.parent
    if not folder.is_dir():
        raise InputError(field, str(path), f"cannot be written: the folder {folder} does not exist")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise InputError(field, str(path), f"cannot be written: the folder {folder} is not writable")
    return final


def _umask() -> int:
    """The process umask (read by setting and restoring it; there is no getter)."""
    mask = os.umask(0)
    os.umask(mask)
    return mask


def _sync_folder(folder: Path) -> None:
    """Make the rename durable; not every system lets a folder be opened or synced, which is harmless here."""
    with contextlib.suppress(OSError, AttributeError):
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
        try:
            os.fsync(fd)
        finally:
            os.close(fd)


@contextlib.contextmanager
def open_output(
    path: str | Path,
    *,
    field: str = "--output",
    inputs: Iterable[str | Path | None] = (),
    force: bool = False,
    binary: bool = False,
) -> Iterator[IO[str]]:
    """A handle to write ``path`` through (text, UTF-8, ``\\n`` lines; bytes with ``binary``).

    The target is replaced only when the ``with`` block ends without an error;
    on any error (or an interruption) the temporary file is removed and the
    old file is untouched.  See the module docstring for the checks.
    """
    final = check_target(path, field=field, inputs=inputs, force=force)
    try:
        handle, tmp = tempfile.mkstemp(prefix=f".{final.name}.", suffix=".tmp", dir=final.parent)
    except OSError as exc:
        raise InputError(field, str(path), f"cannot be written ({_reason(exc)})") from None
    done = False
    try:
        out: IO[Any] = os.fdopen(handle, "wb") if binary else os.fdopen(handle, "w", encoding="utf-8", newline="\n")
        with out:
            yield out
            out.flush()
            os.fsync(out.fileno())
        try:
            old = os.stat(final)
        except FileNotFoundError:
            os.chmod(tmp, 0o666 & ~_umask())
        else:
            os.chmod(tmp, stat.S_IMODE(old.st_mode))
            with contextlib.suppress(OSError, AttributeError):  # only root may give a file to another owner
                os.chown(tmp, old.st_uid, old.st_gid)
        os.replace(tmp, final)
        done = True
        _sync_folder(final.parent)
    except OSError as exc:
        raise InputError(field, str(path), f"cannot be written ({_reason(exc)})") from None
    finally:
        if not done:
            with contextlib.suppress(OSError):
                os.unlink(tmp)


def write_file(
    path: str | Path,
    data: str | bytes,
    *,
    field: str = "--output",
    inputs: Iterable[str | Path | None] = (),
    force: bool = False,
) -> None:
    """Write ``data`` (text as UTF-8, or bytes) to ``path`` atomically, with the checks of :func:`open_output`."""
    with open_output(path, field=field, inputs=inputs, force=force, binary=isinstance(data, bytes)) as out:
        out.write(data)  # type: ignore[arg-type]
