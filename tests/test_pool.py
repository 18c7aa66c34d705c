"""Many comparisons on several processes give exactly what a serial run gives."""
import json

import pytest

from gitrepo import meter_reading
from linter import api, pool
from linter.errors import InputError
from linter.report.json import to_json


@pytest.fixture
def folders(tmp_path):
    old, new = tmp_path / "v1", tmp_path / "v2"
    for n in range(60):
        unit = "m3" if n % 7 == 0 else "L"
        for side, u in ((old, "L"), (new, unit)):
            path = side / f"d{n % 3}" / f"meter_{n:03}.avsc"
            path.parent.mkdir(parents=True, exist_ok=True)
            schema = meter_reading(u)
            schema["name"] = f"MeterReading{n}"
            path.write_text(json.dumps(schema))
    (old / "gone.avsc").write_text(json.dumps(meter_reading()))
    (new / "added.avsc").write_text(json.dumps(meter_reading()))
    return old, new


def test_parallel_equals_serial_in_the_same_order(folders):
    old, new = folders
    serial = to_json(api.check(old, new, jobs=1))
    parallel = to_json(api.check(old, new, jobs=2))
    assert parallel == serial
    assert len(serial["comparisons"]) == 62
    assert [c["new"] for c in serial["comparisons"]] == sorted(c["new"] for c in serial["comparisons"])


def test_threshold_decides_when_no_count_is_given(monkeypatch):
    monkeypatch.delenv(pool.ENV_JOBS, raising=False)
    assert pool.jobs_wanted(pool.THRESHOLD - 1) == 1
    assert pool.jobs_wanted(3, jobs=8) == 3
    monkeypatch.setenv(pool.ENV_JOBS, "1")
    assert pool.jobs_wanted(10_000) == 1
    monkeypatch.setenv(pool.ENV_JOBS, "two")
    with pytest.raises(InputError, match="EVOLINT_JOBS"):
        pool.jobs_wanted(10)


def test_input_error_in_a_worker_keeps_file_and_line(folders):
    old, new = folders
    (new / "d1" / "meter_031.avsc").write_text('{"type": "record",\n  oops}')
    # the first bad pair in input order is reported, as a serial run would
    with pytest.raises(InputError) as serial:
        api.check(old, new, jobs=1)
    with pytest.raises(InputError) as parallel:
        api.check(old, new, jobs=2)
    assert str(parallel.value) == str(serial.value)
    assert parallel.value.file.endswith("meter_031.avsc")
