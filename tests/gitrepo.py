"""Real temporary git repositories for tests, built with the git binary."""
from __future__ import annotations

import json
import subprocess
from pathlib import Path


class Repo:
    def __init__(self, path: Path):
        self.path = Path(path)
        self.path.mkdir(parents=True, exist_ok=True)
        self.git("init", "-q", "-b", "main")
        self.git("config", "user.email", "dev@utility.example")
        self.git("config", "user.name", "Schema Author")
        self.git("config", "commit.gpgsign", "false")

    def git(self, *args: str) -> str:
        done = subprocess.run(["git", *args], cwd=self.path, capture_output=True, text=True, check=True)
        return done.stdout

    def write(self, rel: str, content) -> Path:
        path = self.path / rel
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(content if isinstance(content, str) else json.dumps(content, indent=2) + "\n")
        return path

    def commit(self, message: str = "change", *paths: str) -> str:
        self.git("add", "-A", *paths)
        self.git("commit", "-q", "-m", message)
        return self.git("rev-parse", "HEAD").strip()

    def status(self) -> str:
        return self.git("status", "--porcelain", "--untracked-files=all")


def meter_reading(volume_unit: str = "L", extra_fields=()) -> dict:
    """The invented water utility's meter reading, as an Avro record."""
    return {
        "type": "record", "name": "MeterReading", "namespace": "utility.metering",
        "fields": [
            {"name": "meter_id", "type": "string"},
            {"name": "volume", "type": "double", "unit": volume_unit},
            *extra_fields,
        ],
    }


def leak_alert() -> dict:
    return {"type": "record", "name": "LeakAlert", "namespace": "utility.leaks",
            "fields": [{"name": "meter_id", "type": "string"}, {"name": "severity", "type": "int"}]}
