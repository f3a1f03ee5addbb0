"""Loading the shipped model files (one model per nucleus), only from the package's own models/ directory.

Every file's SHA-256 is checked against ``manifest.json`` before it is opened;
a mismatch or a missing file is refused with a clear error.  There is no way to
point the loader at another directory from the command line: files a user
supplies are never unpickled.
"""
from __future__ import annotations

import hashlib
import json
from functools import lru_cache
from importlib import resources
from pathlib import Path

import numpy as np

from .configuration import increments_from_entry
from .environment import feature_names
from .model import ShiftModel
from .ring_systems import RingTables
from .sphere_tables import SphereTables
from .trees import Forest


class ModelFileError(RuntimeError):
    """A model file is missing, altered or unreadable."""


def models_dir() -> Path:
    """The package's own model directory (``models/`` of the source tree, installed as ``shiftrank.models``)."""
    return Path(str(resources.files("shiftrank.models")))


def sha256_file(path: Path) -> str:
    """Hex SHA-256 of a file, read in 1 MiB chunks."""
    h = hashlib.sha256()
    with open(path, "rb") as f:
        for chunk in iter(lambda: f.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def read_manifest(directory: Path | None = None) -> dict:
    d = directory or models_dir()
    path = d / "manifest.json"
    if not path.exists():
        raise ModelFileError(f"{path}: model manifest missing; reinstall shiftrank or run python -m training.train_shifts")
    try:
        return json.loads(path.read_text())
    except json.JSONDecodeError as exc:
        raise ModelFileError(f"{path}: manifest is not valid JSON ({exc.msg})") from None


def verified_path(name: str, manifest: dict, directory: Path) -> Path:
    """Path of a model file whose SHA-256 matches the manifest; raises :class:`ModelFileError` otherwise."""
    expected = manifest.get("files", {}).get(name)
    path = directory / name
    if expected is None:
        raise ModelFileError(f"{name}: not listed in the model manifest; refusing to load it")
    if not path.exists():
        raise ModelFileError(f"{path}: model file missing")
    got = sha256_file(path)
    if got != expected:
        raise ModelFileError(f"{path}: SHA-256 {got[:12]}… does not match the manifest ({expected[:12]}…); "
                             "the file was altered or corrupted, refusing to load it")
    return path


#: Model files of each nucleus: sphere tables and the boosted trees, both plain numpy arrays (no pickle).
FILES = {"13C": ("c13_tables.npz", "c13_trees.npz"), "1H": ("h1_tables.npz", "h1_trees.npz")}


def boost_arrays(model: ShiftModel) -> dict[str, np.ndarray]:
    """The boosted parts of ``model`` as named arrays: members ``m0_…``, ``m1_…``, the error model ``sigma_…``."""
    out = {}
    for i, member in enumerate(model.regressors):
        out.update(Forest.of(member).to_arrays(f"m{i}_"))
    out.update(Forest.of(model.sigma_regressor).to_arrays("sigma_"))
    out["sigma_scale_floor"] = np.array([model.sigma_scale, model.sigma_floor])
    return out


def _boost_from_arrays(z) -> tuple[list[Forest], Forest, float, float]:
    names = set(z.files)
    members = []
    while f"m{len(members)}_scalars" in names:
        members.append(Forest.from_arrays(z, f"m{len(members)}_"))
    if not members:
        raise ValueError("no boosted member in the file")
    scale, floor = z["sigma_scale_floor"]
    return members, Forest.from_arrays(z, "sigma_"), float(scale), float(floor)


def nucleus_entry(manifest: dict, nucleus: str) -> dict:
    """The manifest's section for ``nucleus``; raises :class:`ModelFileError` when the model is not shipped."""
    entry = manifest.get("nuclei", {}).get(nucleus)
    if entry is None:
        raise ModelFileError(f"no {nucleus} model in the model manifest; train it with "
                             f"python -m training.train_shifts --nucleus {nucleus}")
    return entry


def load_shift_model(directory: Path | None = None, nucleus: str = "13C") -> ShiftModel:
    """Load and verify the model of ``nucleus``.  ``directory`` exists for tests of the verification itself."""
    if nucleus not in FILES:
        raise ModelFileError(f"nucleus {nucleus!r}: models exist for {', '.join(FILES)}")
    d = directory or models_dir()
    man = read_manifest(d)
    entry = nucleus_entry(man, nucleus)
    tables_name, boost_name = FILES[nucleus]
    tables_path = verified_path(tables_name, man, d)
    boost_path = verified_path(boost_name, man, d)
    with np.load(tables_path, allow_pickle=False) as z:
        arrays = {k: z[k] for k in z.files}
    tables = SphereTables.from_arrays({k: v for k, v in arrays.items() if not k.startswith("ring_")})
    ring_tables = RingTables.from_arrays(arrays)
    if entry.get("feature_names") != feature_names(nucleus):
        raise ModelFileError(f"{d}: the {nucleus} model was trained with a different atom-environment feature set than "
                             "this version of shiftrank computes; retrain with training/train_shifts.py")
    try:
        with np.load(boost_path, allow_pickle=False) as z:
            members, sigma, scale, floor = _boost_from_arrays(z)
    except (ValueError, KeyError, OSError) as exc:
        raise ModelFileError(f"{boost_path}: unreadable boosted-tree file ({exc})") from None
    model = ShiftModel(tables, members, sigma, scale, floor, nucleus, ring_tables)
    # a member reads the descriptors alone, the descriptors and the sphere-table statistics after them,
    # or (when the file has ring tables) those and the ring-table statistics after them
    n_sphere = model.sphere_width
    views = {len(feature_names(nucleus)), n_sphere} | ({n_sphere + RingTables.WIDTH} if ring_tables is not None else set())
    if any(m.n_features_in_ not in views for m in members):
        raise ModelFileError(f"{boost_path}: a boosted member expects {sorted({m.n_features_in_ for m in members} - views)} "
                             f"input columns; this version of shiftrank gives {', '.join(map(str, sorted(views)))}")
    model.drop_unread_ring_tables()
    try:
        model.config_increments = increments_from_entry(entry)
    except (ValueError, TypeError, AttributeError) as exc:
        raise ModelFileError(f"{d}: the {nucleus} entry's configuration increments are unreadable ({exc})") from None
    return model


@lru_cache(maxsize=None)
def default_model(nucleus: str = "13C") -> ShiftModel:
    """The shipped model of ``nucleus``, loaded once per process."""
    return load_shift_model(nucleus=nucleus)


@lru_cache(maxsize=1)
def default_manifest() -> dict:
    return read_manifest()


def has_model(nucleus: str) -> bool:
    """True when the package ships a model for ``nucleus``."""
    return nucleus in default_manifest().get("nuclei", {})
