"""The contributor guide lists every machine-file key; the README keeps its promises."""

from __future__ import annotations

import re

from machines.files import section_specs

from conftest import ROOT


def test_every_machine_file_key_is_in_the_glossary():
    text = (ROOT / "DEVELOPERS.md").read_text("utf-8")
    missing = [f"{section}.{key}" for kind in ("induction-motor", "synchronous-generator")
               for section, specs in section_specs(kind).items() for key in specs
               if f"| `{key}` |" not in text]
    assert not missing, f"add these keys to the DEVELOPERS.md glossary: {missing}"


def test_readme_states_the_job_and_the_two_setup_commands():
    text = (ROOT / "README.md").read_text("utf-8")
    first = text.split("\n\n")[1]
    assert "protection" in first and "motor" in first and "generator" in first
    assert "python -m pip install . && relaywright demo" in text
    assert "python -m pip install '.[test]' && python -m pytest" in text
    ci = (ROOT / ".ci" / "run").read_text("utf-8")
    assert "python -m pip install '.[test]' && python -m pytest" in ci


def test_readme_carries_the_safety_caution():
    text = (ROOT / "README.md").read_text("utf-8")
    assert re.search(r"licensed engineer", text) and "local codes" in text and "tested" in text


def test_glossary_is_the_generated_one():
    # the glossary is generated from the field specs: `python -m machines.glossary DEVELOPERS.md` after adding a key
    from machines.glossary import END, START, glossary_markdown

    text = (ROOT / "DEVELOPERS.md").read_text("utf-8")
    block = text.split(START, 1)[1].split(END, 1)[0]
    assert block.strip() == glossary_markdown().strip(), "run: python -m machines.glossary DEVELOPERS.md"
