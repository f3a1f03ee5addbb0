import os
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[1]
DATA = Path(os.environ.get("SHIFTRANK_DATA", REPO.parent / "shared" / "data"))


@pytest.fixture(scope="session")
def shared_data() -> Path:
    """The open development data (../shared/data); tests that need it are skipped where it is absent."""
    if not (DATA / "assigned_13c.csv.gz").exists():
        pytest.skip(f"development data not found at {DATA}")
    return DATA
