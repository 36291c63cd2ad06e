"""Template -> filled in by a program -> read back: the model equals what was written.

Protects: the template and the reader agree on the layout; `templates/` matches the generator.
"""

from pathlib import Path

import numpy as np
import openpyxl
import pytest

from xlcore import demo, layout
from xlcore.pipeline import load
from xlcore.workbook.template import write_template

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "templates" / "xlcore-template.xlsx"
SAMPLE = ROOT / "sample_workbooks" / "harbourview-lane-demo.xlsx"


def fill(blank: Path, out: Path, data: dict) -> Path:
    wb = openpyxl.load_workbook(blank)
    ws = wb[layout.PROJECT.name]
    for r, s in enumerate(layout.PROJECT.settings, start=2):
        assert ws.cell(r, 1).value == s.label
        ws.cell(r, 2).value = data["project"].get(s.key)
    for t in layout.TABLES:
        ws = wb[t.name]
        for i, rec in enumerate(data[t.key], start=2):
            for j, c in enumerate(t.columns, start=1):
                ws.cell(i, j).value = rec.get(c.key)
    wb.save(out)
    return out


def test_filled_template_reads_back_equal(blank_master, tmp_path):
    data = demo.sheets()
    b, findings = load(fill(blank_master, tmp_path / "filled.xlsx", data))
    assert findings.errors == []
    assert b.settings.project_name == data["project"]["project_name"]
    assert [s.model_dump(include={"name", "level", "height", "slab"}) for s in b.storeys] == data["storeys"]
    keys = layout.WALLS.keys
    assert [w.model_dump(include=set(keys)) for w in b.walls] == [
        {k: r[k] for k in keys} for r in data["walls"]
    ]
    keys = layout.OPENINGS.keys
    assert [o.model_dump(include=set(keys)) for o in b.openings] == [
        {k: r.get(k) for k in keys} for r in data["openings"]
    ]
    acts = b.member_actions
    assert len(acts) == len(data["member_actions"])
    for key in ("storey", "combination", "member"):
        assert acts[key].tolist() == [r[key] for r in data["member_actions"]]
    for key in ("n", "v", "m"):
        assert np.allclose(acts[key].to_numpy(float), [r[key] for r in data["member_actions"]])
    assert acts.m_out.isna().all()
    assert len(b.core_actions) == len(data["core_actions"])


def _content(path: Path) -> dict:
    """What an engineer sees: values, comments, validations, panes, widths per sheet."""
    wb = openpyxl.load_workbook(path)
    out = {}
    for ws in wb.worksheets:
        out[ws.title] = dict(
            cells={
                c.coordinate: (
                    c.value,
                    c.number_format,
                    c.fill.fgColor.rgb,
                    c.comment.text if c.comment else None,
                )
                for row in ws.iter_rows()
                for c in row
                if c.value is not None or c.comment
            },
            validations=sorted(
                (str(d.sqref), d.type, d.formula1, d.formula2) for d in ws.data_validations.dataValidation
            ),
            freeze=ws.freeze_panes,
            widths={k: v.width for k, v in ws.column_dimensions.items()},
        )
    return out


def test_bundled_template_matches_generator(tmp_path):
    """`templates/` holds the generator's output; regenerate with `xlcore template` on drift."""
    fresh = tmp_path / "fresh.xlsx"
    write_template(fresh)
    assert TEMPLATE.exists(), "run: xlcore template templates/xlcore-template.xlsx --overwrite"
    assert _content(TEMPLATE) == _content(fresh)


def test_bundled_sample_matches_generator(tmp_path):
    fresh = tmp_path / "fresh.xlsx"
    write_template(fresh, example=True)
    input_sheets = set(layout.INPUT_SHEET_NAMES) | {layout.INSTRUCTIONS_SHEET}
    sample = {k: v for k, v in _content(SAMPLE).items() if k in input_sheets}
    assert sample == _content(fresh)


def test_template_has_every_layout_column_and_help(blank_master):
    wb = openpyxl.load_workbook(blank_master)
    assert wb.sheetnames == [layout.INSTRUCTIONS_SHEET, *layout.INPUT_SHEET_NAMES]
    for t in layout.TABLES:
        ws = wb[t.name]
        headers = [c.value for c in ws[1]]
        assert headers == [c.header for c in t.columns]
        assert all(c.comment is not None for c in ws[1])
        assert ws.freeze_panes == "A2"


@pytest.mark.parametrize(
    "sheet,key,kind",
    [
        (layout.OPENINGS, "wall_id", "list"),
        (layout.MEMBER_ACTIONS, "storey", "list"),
        (layout.WALLS, "fc", "decimal"),
        (layout.WALLS, "v_layers", "whole"),
    ],
)
def test_template_validation_lists_and_ranges(blank_master, sheet, key, kind):
    wb = openpyxl.load_workbook(blank_master)
    letter = openpyxl.utils.get_column_letter(sheet.keys.index(key) + 1)
    dvs = [d for d in wb[sheet.name].data_validations.dataValidation if str(d.sqref).startswith(letter + "2")]
    assert len(dvs) == 1 and dvs[0].type == kind


def test_instructions_carry_the_caution(blank_master):
    wb = openpyxl.load_workbook(blank_master)
    texts = " ".join(
        str(c.value) for row in wb[layout.INSTRUCTIONS_SHEET].iter_rows() for c in row if c.value
    )
    assert "qualified" in texts and "licensed" in texts


def test_member_column_offers_wall_ids_without_refusing_pier_ids(blank_master):
    """Issue 12 §2: the member drop-down lists the wall IDs (what the workbook can know) but
    accepts any text, since pier and lintel IDs are derived; the reader stays the judge."""
    wb = openpyxl.load_workbook(blank_master)
    t = layout.MEMBER_ACTIONS
    letter = openpyxl.utils.get_column_letter(t.keys.index("member") + 1)
    dvs = [d for d in wb[t.name].data_validations.dataValidation if str(d.sqref).startswith(letter + "2")]
    assert len(dvs) == 1 and dvs[0].type == "list"
    wall_col = openpyxl.utils.get_column_letter(layout.WALLS.keys.index("wall_id") + 1)
    assert dvs[0].formula1.startswith(f"{layout.WALLS.name}!${wall_col}$2")
    assert not dvs[0].showErrorMessage
