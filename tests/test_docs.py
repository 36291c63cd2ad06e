"""The README's layout section is generated from the layout definition and must not drift."""

from pathlib import Path

from xlcore import layout

README = Path(__file__).resolve().parents[1] / "README.md"


def test_readme_layout_section_matches_layout():
    text = README.read_text(encoding="utf-8")
    start = text.index("<!-- layout:start")
    start = text.index("\n", start) + 1
    end = text.index("<!-- layout:end -->")
    assert text[start:end].strip() == layout.markdown().strip(), (
        "regenerate with: python -m xlcore.layout, and paste between the layout markers"
    )


def test_readme_carries_the_caution_and_two_setup_commands():
    text = README.read_text(encoding="utf-8")
    assert "qualified structural engineer" in text and "licensed" in text
    assert text.count("```sh") == 2
