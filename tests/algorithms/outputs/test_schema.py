"""Output schemas: declared once, consistent, and named by the help texts."""

import doctest
import re
from html.parser import HTMLParser

import sectionwright.algorithms.outputs.fields as F
import sectionwright.algorithms.outputs.schema as schema_module
from sectionwright.algorithms.outputs.schema import Schema

SCHEMAS = {name: value for name, value in vars(F).items() if isinstance(value, Schema)}
KNOWN_NAMES = {field.name for s in SCHEMAS.values() for field in s}


def test_schema_examples_run():
    assert doctest.testmod(schema_module).failed == 0


def test_a_name_has_one_kind_in_every_output():
    kinds = {}
    for schema in SCHEMAS.values():
        for field in schema:
            kinds.setdefault(field.name, set()).add(field.kind)
    assert {name: k for name, k in kinds.items() if len(k) > 1} == {}


def test_every_field_says_what_it_means():
    assert [f.name for s in SCHEMAS.values() for f in s if not f.meaning.strip()] == []


class _Outputs(HTMLParser):
    """{output label: field names in italics} of the help's Outputs list."""

    def __init__(self):
        super().__init__()
        self.outputs, self.in_outputs, self.tag, self.label = {}, False, None, None

    def handle_starttag(self, tag, attrs):
        self.tag = tag

    def handle_endtag(self, tag):
        self.tag = None

    def handle_data(self, data):
        if self.tag == "h3":
            self.in_outputs = data.strip() == "Outputs"
        elif self.in_outputs and self.tag == "dt":
            self.label = " ".join(data.split())
            self.outputs[self.label] = set()
        elif self.in_outputs and self.tag == "i" and self.label:
            if data.strip() in KNOWN_NAMES:
                self.outputs[self.label].add(data.strip())


def _help_outputs(algorithm):
    parser = _Outputs()
    parser.feed(algorithm.shortHelpString())
    return parser.outputs


def _algorithms(provider):
    return sorted(provider.algorithms(), key=lambda a: a.name())


def test_help_texts_are_flowing_in_their_outputs_section(provider):
    for algorithm in _algorithms(provider):
        outputs = algorithm.shortHelpString().split("<h3>Outputs</h3>")[-1]
        items = re.findall(r"<d[td]>(.*?)</d[td]>", outputs, flags=re.S)
        assert [item for item in items if "\n" in item] == [], algorithm.name()


def test_help_names_exactly_the_fields_of_each_output(provider):
    """Every output of every algorithm has its entry in the help's Outputs
    list, under its label, naming exactly the fields of its schema (for
    outputs that carry the source's fields: the computed ones)."""
    checked = 0
    for algorithm in _algorithms(provider):
        described = _help_outputs(algorithm)
        for name, schema in algorithm.OUTPUT_SCHEMAS.items():
            label = algorithm.parameterDefinition(name).description()
            assert label in described, (algorithm.name(), label, sorted(described))
            assert described[label] == set(schema.names), (algorithm.name(), label)
            checked += 1
    assert checked >= 16


def test_every_sink_has_a_schema(provider):
    for algorithm in _algorithms(provider):
        sinks = {
            p.name() for p in algorithm.destinationParameterDefinitions() if p.type() == "sink"
        }
        assert sinks == set(algorithm.OUTPUT_SCHEMAS), algorithm.name()
