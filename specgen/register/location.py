"""Where the shop's one register lives: named once, found the same way by every command.

In order, the first that applies:

1. ``--register PATH|URL`` on the command line (for a one-off look at another register);
2. ``$SPECGEN_REGISTER``;
3. ``register:`` in the shop file (``shop.yaml`` of the catalogue in use); a relative path is taken
   from the catalogue folder, so it names the same file from wherever a command runs;
4. the shop's root, found by walking up: the folder that holds the shop's catalogue folder (the
   ``--catalog`` / ``$SPECGEN_CATALOG`` folder, else a ``catalog/shop.yaml`` found walking up from
   the spec, or from the current folder for the ``orders`` commands), else the git work tree's root;
   the register is ``specgen-register.sqlite`` there.

The register is never created beside each spec: with none of these, the command stops and says how
to name one. A PostgreSQL URL (``postgresql://...``) may stand wherever a path does.
"""

from __future__ import annotations

import dataclasses
import os
from collections.abc import Mapping
from pathlib import Path

from specgen.errors import SpecError

from .postgres import is_url, shown

REGISTER_FILENAME = "specgen-register.sqlite"
ENV_VAR = "SPECGEN_REGISTER"


@dataclasses.dataclass(frozen=True, slots=True)
class RegisterLocation:
    """A register's address (a file path or a ``postgresql://`` URL) and how it was found."""

    target: str
    found_by: str

    @property
    def kind(self) -> str:
        return "postgresql" if is_url(self.target) else "sqlite"

    @property
    def shown(self) -> str:
        """The address as printed: a URL without its password."""
        return shown(self.target) if is_url(self.target) else self.target

    def to_dict(self) -> dict[str, str]:
        return {"location": self.shown, "kind": self.kind, "found_by": self.found_by}


def _shipped_catalog() -> Path:
    from specgen.catalog.loader import shipped_catalog_dir

    return shipped_catalog_dir().resolve()


def shop_root(start: str | os.PathLike[str] | None = None, catalog_dir: str | os.PathLike[str] | None = None
              ) -> tuple[Path, str] | None:
    """(the shop's root folder, how it was recognised), or None.

    ``catalog_dir`` is the catalogue folder in use (the shipped one is no shop's). Without it, walk
    up from ``start`` (a file or folder; default the current folder) for a ``catalog/shop.yaml``, then
    for a git work tree (``.git``)."""
    if catalog_dir is not None:
        folder = Path(catalog_dir).resolve()
        if folder != _shipped_catalog() and (folder / "shop.yaml").is_file():
            return folder.parent, f"the folder holding the catalogue {folder}"
    here = Path(start if start is not None else os.getcwd()).resolve()
    if not here.is_dir():
        here = here.parent
    chain = [here, *here.parents]
    for folder in chain:
        if (folder / "catalog" / "shop.yaml").is_file():
            return folder, f"the folder holding the catalogue {folder / 'catalog'}"
    for folder in chain:
        if (folder / ".git").exists():
            return folder, f"the git root {folder}"
    return None


def locate_register(start: str | os.PathLike[str] | None = None, explicit: str | os.PathLike[str] | None = None, *,
                    shop_setting: str | None = None, catalog_dir: str | os.PathLike[str] | None = None,
                    environ: Mapping[str, str] | None = None) -> RegisterLocation:
    """The register every command uses (module docstring for the order).

    ``start``: the spec or CSV being issued (default: the current folder). ``shop_setting``: the shop
    file's ``register:`` value; ``catalog_dir``: the catalogue folder it came from (relative settings
    are taken from there, and its parent is the shop's root).
    """
    env = os.environ if environ is None else environ
    if explicit is not None and str(explicit).strip():
        return RegisterLocation(str(explicit), "--register")
    if env.get(ENV_VAR, "").strip():
        return RegisterLocation(env[ENV_VAR].strip(), f"${ENV_VAR}")
    if shop_setting is not None and str(shop_setting).strip():
        setting = str(shop_setting).strip()
        base = Path(catalog_dir) if catalog_dir is not None else Path.cwd()
        if is_url(setting):
            return RegisterLocation(setting, f"register: in {base / 'shop.yaml'}")
        target = Path(os.path.expanduser(setting))
        if not target.is_absolute():
            target = Path(os.path.normpath(base.resolve() / target))
        return RegisterLocation(str(target), f"register: in {base / 'shop.yaml'}")
    found = shop_root(start, catalog_dir)
    if found is None:
        where = Path(start).resolve() if start is not None else Path.cwd()
        raise SpecError("no register named and no shop root found above this folder (no catalog/shop.yaml, "
                        "no git work tree): name the shop's register once with `register:` in shop.yaml or "
                        f"${ENV_VAR}, or pass --register", file=str(where))
    root, how = found
    return RegisterLocation(str(root / REGISTER_FILENAME), f"default: {how}")


def shop_register_setting(catalog_dir: str | os.PathLike[str] | None = None) -> tuple[str | None, Path]:
    """(the ``register:`` value of the shop file, the catalogue folder) without loading the catalogue.

    For the ``orders`` commands, which need nothing else from it; a shop file they cannot read
    leaves the setting unset (the commands that issue load and check the whole catalogue)."""
    import yaml

    from specgen.catalog.loader import resolve_catalog_dir

    folder = resolve_catalog_dir(catalog_dir)
    try:
        data = yaml.safe_load((folder / "shop.yaml").read_text(encoding="utf-8"))
    except (OSError, yaml.YAMLError, UnicodeDecodeError):
        return None, folder
    shop = data.get("shop") if isinstance(data, dict) else None
    value = shop.get("register") if isinstance(shop, dict) else None
    return (str(value) if value not in (None, "") else None), folder


def default_register_path(spec_path: str | os.PathLike[str] | None = None, explicit: str | os.PathLike[str] | None = None, *,
                          shop_setting: str | None = None, catalog_dir: str | os.PathLike[str] | None = None,
                          environ: Mapping[str, str] | None = None) -> str:
    """The register's address alone (see :func:`locate_register`)."""
    return locate_register(spec_path, explicit, shop_setting=shop_setting, catalog_dir=catalog_dir,
                           environ=environ).target
