"""Drive LibreOffice Calc over UNO as a user would. Run with Debian's own python3, which has
the `uno` module (python3-uno); the project's virtual environment does not.

    lo_driver.py resave SRC DST                  open SRC, save as .xlsx DST
    lo_driver.py type SRC DST SHEET CELL TEXT [SHEET CELL TEXT ...]
                                                 type each TEXT into SHEET!CELL (as keystrokes), save DST
    lo_driver.py addsheet SRC DST NAME TEXT      insert a sheet NAME at the end with TEXT in A1, save DST
    lo_driver.py pdf SRC DST                     export SRC to PDF
    lo_driver.py read SRC SHEET CELL [CELL ...]  print each cell's value, one per line
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import uno
from com.sun.star.beans import PropertyValue


def prop(name, value):
    p = PropertyValue()
    p.Name, p.Value = name, value
    return p


class Office:
    def __init__(self):
        self.profile = tempfile.mkdtemp(prefix="lo-profile-")
        self.pipe = f"xlcore{os.getpid()}"
        self.proc = subprocess.Popen(
            [
                "soffice",
                "--headless",
                "--invisible",
                "--norestore",
                "--nologo",
                "--nodefault",
                f"-env:UserInstallation=file://{self.profile}",
                f"--accept=pipe,name={self.pipe};urp;",
            ],
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )
        local = uno.getComponentContext()
        resolver = local.ServiceManager.createInstanceWithContext("com.sun.star.bridge.UnoUrlResolver", local)
        for _ in range(120):
            try:
                self.ctx = resolver.resolve(f"uno:pipe,name={self.pipe};urp;StarOffice.ComponentContext")
                break
            except Exception:
                time.sleep(0.5)
        else:
            raise RuntimeError("LibreOffice did not start")
        self.smgr = self.ctx.ServiceManager
        self.desktop = self.smgr.createInstanceWithContext("com.sun.star.frame.Desktop", self.ctx)

    def open(self, path: str):
        doc = self.desktop.loadComponentFromURL(
            uno.systemPathToFileUrl(str(Path(path).resolve())), "_blank", 0, (prop("Hidden", True),)
        )
        if doc is None:
            raise RuntimeError(f"LibreOffice could not open {path}")
        return doc

    def close(self):
        try:
            self.desktop.terminate()
        except Exception:
            pass
        self.proc.wait(timeout=30)


def main(argv: list[str]) -> int:
    cmd, src = argv[0], argv[1]
    office = Office()
    try:
        doc = office.open(src)
        if cmd == "resave":
            doc.storeToURL(
                uno.systemPathToFileUrl(str(Path(argv[2]).resolve())),
                (prop("FilterName", "Calc MS Excel 2007 XML"),),
            )
        elif cmd == "type":
            dst, triples = argv[2], argv[3:]
            frame = doc.getCurrentController().getFrame()
            dispatch = office.smgr.createInstanceWithContext("com.sun.star.frame.DispatchHelper", office.ctx)
            for k in range(0, len(triples), 3):
                sheet, cell, text = triples[k : k + 3]
                col = "".join(ch for ch in cell if ch.isalpha())
                row = "".join(ch for ch in cell if ch.isdigit())
                target = f"$'{sheet}'.${col}${row}"
                dispatch.executeDispatch(frame, ".uno:GoToCell", "", 0, (prop("ToPoint", target),))
                dispatch.executeDispatch(frame, ".uno:EnterString", "", 0, (prop("StringName", text),))
            doc.calculateAll()
            doc.storeToURL(
                uno.systemPathToFileUrl(str(Path(dst).resolve())),
                (prop("FilterName", "Calc MS Excel 2007 XML"),),
            )
        elif cmd == "addsheet":
            dst, name, text = argv[2:5]
            doc.Sheets.insertNewByName(name, doc.Sheets.getCount())
            doc.Sheets.getByName(name).getCellRangeByName("A1").setString(text)
            doc.storeToURL(
                uno.systemPathToFileUrl(str(Path(dst).resolve())),
                (prop("FilterName", "Calc MS Excel 2007 XML"),),
            )
        elif cmd == "pdf":
            doc.storeToURL(
                uno.systemPathToFileUrl(str(Path(argv[2]).resolve())),
                (prop("FilterName", "calc_pdf_Export"),),
            )
        elif cmd == "read":
            doc.calculateAll()
            sheet = doc.Sheets.getByName(argv[2])
            for ref in argv[3:]:
                c = sheet.getCellRangeByName(ref)
                print(c.getString() if c.getType().value == "TEXT" else repr(c.getValue()))
        else:
            raise SystemExit(f"unknown command {cmd}")
        doc.close(True)
    finally:
        office.close()
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
