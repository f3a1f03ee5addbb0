"""Loading the shipped model files, only from the package's own models/ directory.

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

import joblib
import numpy as np

from .environment import FEATURE_NAMES
from .model import ShiftModel
from .sphere_tables import SphereTables


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
        raise ModelFileError(f"{path}: model manifest missing; reinstall shiftrank or run training/train_13c.py")
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


def load_shift_model(directory: Path | None = None) -> ShiftModel:
    """Load and verify the 13C model.  ``directory`` exists for tests of the verification itself."""
    d = directory or models_dir()
    man = read_manifest(d)
    tables_path = verified_path("c13_tables.npz", man, d)
    boost_path = verified_path("c13_boost.joblib", man, d)
    with np.load(tables_path, allow_pickle=False) as z:
        tables = SphereTables.from_arrays({k: z[k] for k in z.files})
    if man.get("feature_names") != FEATURE_NAMES:
        raise ModelFileError(f"{d}: the model was trained with a different atom-environment feature set than this "
                             "version of shiftrank computes; retrain with training/train_13c.py")
    parts = joblib.load(boost_path)  # hash verified above: our own file
    return ShiftModel(tables, parts["regressor"], parts["sigma_regressor"], parts["sigma_scale"], parts["sigma_floor"])


@lru_cache(maxsize=1)
def default_model() -> ShiftModel:
    """The shipped 13C model, loaded once per process."""
    return load_shift_model()


@lru_cache(maxsize=1)
def default_manifest() -> dict:
    return read_manifest()
