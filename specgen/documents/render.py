"""Safe HTML -> PDF rendering shared by every document.

- jinja2 with autoescape on for every template and StrictUndefined (a missing value is a bug, not a blank);
- WeasyPrint's fetcher limited to files inside the project's templates folder: no other file://, no
  http(s)://, no data: URLs (our own images are files in templates/assets or inline SVG in the HTML);
- the PDF and the HTML are written together atomically (both or neither).

WeasyPrint is imported inside the functions that need it (its import costs ~1 s), so the commands that
only print numbers never load it.
"""

from __future__ import annotations

import os
from pathlib import Path
from urllib.parse import unquote, urlparse

from ..atomic import atomic_paths

_ENV = None


def templates_dir() -> Path:
    here = Path(__file__).resolve().parent.parent
    packaged = here / "data" / "templates"
    return packaged if packaged.is_dir() else here.parent / "templates"


def jinja_env():
    """The one jinja2 environment: autoescape on for every template, undefined values raise."""
    global _ENV
    if _ENV is None:
        import jinja2

        _ENV = jinja2.Environment(loader=jinja2.FileSystemLoader(str(templates_dir())),
                                  autoescape=True, undefined=jinja2.StrictUndefined,
                                  trim_blocks=True, lstrip_blocks=True)
    return _ENV


def render_html(template: str, **context) -> str:
    return jinja_env().get_template(template).render(**context)


class BlockedFetch(Exception):
    pass


def _allowed_path(url: str) -> Path | None:
    parsed = urlparse(url)
    if parsed.scheme != "file":
        return None
    path = Path(unquote(parsed.path)).resolve()
    root = templates_dir().resolve()
    try:
        path.relative_to(root)
    except ValueError:
        return None
    return path if path.is_file() else None


def make_fetcher(log: list | None = None):
    """A WeasyPrint URL fetcher that serves only files inside templates/ and refuses everything else.

    Refused URLs are appended to ``log`` (tests read it) and rendering goes on without them.
    """
    from weasyprint import URLFetcher
    from weasyprint.urls import URLFetcherResponse  # type: ignore[attr-defined,unused-ignore]

    class _Fetcher(URLFetcher):
        def fetch(self, url, headers=None):
            path = _allowed_path(url)
            if path is None:
                if log is not None:
                    log.append(url)
                raise BlockedFetch(f"blocked: {url[:80]}")
            return URLFetcherResponse(url, body=path.read_bytes(), headers=_headers_for(path))

    return _Fetcher()


def _headers_for(path: Path) -> dict:
    types = {".css": "text/css", ".svg": "image/svg+xml", ".png": "image/png", ".woff2": "font/woff2",
             ".ttf": "font/ttf", ".otf": "font/otf"}
    return {"Content-Type": types.get(path.suffix.lower(), "application/octet-stream")}


def html_to_pdf(html: str, blocked: list | None = None) -> bytes:
    """Render HTML (base URL: the templates folder) to PDF bytes with the locked-down fetcher."""
    from weasyprint import HTML

    base = templates_dir().resolve().as_uri() + "/"
    return HTML(string=html, base_url=base, url_fetcher=make_fetcher(blocked)).write_pdf()


def write_pdf_and_html(html: str, pdf_path: str | os.PathLike, html_path: str | os.PathLike | None,
                       blocked: list | None = None, *, make_folders: bool = False) -> list:
    """Render and write both files atomically (both or neither). Returns the written paths.

    ``make_folders``: create a missing output folder only now, once the PDF is rendered (and remove it
    again if the write fails), so a refused or failed command leaves no empty folder behind."""
    pdf = html_to_pdf(html, blocked)
    targets = [Path(pdf_path)] + ([Path(html_path)] if html_path else [])
    with atomic_paths(*targets, make_folders=make_folders) as temps:
        temps[0].write_bytes(pdf)
        if html_path:
            temps[1].write_text(html, encoding="utf-8")
    return targets
