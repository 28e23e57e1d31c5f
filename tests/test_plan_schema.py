"""docs/plan.schema.json (JSON Schema 2020-12, checked with the jsonschema package) accepts the
JSON of every example and refuses a plan with a broken contract key."""

import copy
from pathlib import Path

import pytest

import regentime

jsonschema = pytest.importorskip("jsonschema")
ROOT = Path(__file__).resolve().parent.parent
SCHEMA = __import__("json").loads((ROOT / "docs" / "plan.schema.json").read_text(encoding="utf-8"))
EXAMPLES = sorted((ROOT / "cavities").glob("*.yaml"))


def test_schema_is_valid_2020_12():
    jsonschema.Draft202012Validator.check_schema(SCHEMA)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_every_example_validates(path):
    jsonschema.Draft202012Validator(SCHEMA).validate(regentime.plan(path).to_dict())


def test_schema_refuses_broken_keys():
    d = regentime.plan(ROOT / "cavities" / "ti_sapphire_1khz.yaml").to_dict()
    v = jsonschema.Draft202012Validator(SCHEMA)
    for breaking in (lambda x: x.pop("round_trip_time_s"),
                     lambda x: x["dump"].update(round_trip="eleven"),
                     lambda x: x["checks"].append({"name": "damage", "level": "fatal", "message": ""}),
                     lambda x: x.update(self_lasing={"closed_state": "maybe"})):
        bad = copy.deepcopy(d)
        breaking(bad)
        assert not v.is_valid(bad)
