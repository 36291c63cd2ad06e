"""Pages of text on A4 with matplotlib: a cursor that flows headings, paragraphs, key-value
lines and tables down the page and opens a new page when one is full. Header (project, stamp)
and footer (caution, page x of y) go on every page once the page count is known."""

from __future__ import annotations

import textwrap
from dataclasses import dataclass, field

import matplotlib

matplotlib.use("Agg")  # no display: files only (must precede pyplot)
from matplotlib import pyplot as plt  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.lines import Line2D  # noqa: E402

A4 = (8.27, 11.69)  # inches, portrait
LEFT, RIGHT, TOP, BOTTOM = 0.07, 0.93, 0.93, 0.065  # figure fractions inside the header/footer
PT = 1 / 72 / A4[1]  # one point as a fraction of the page height
CHARS_PER_INCH = 17.0  # DejaVu Sans at 8 pt, about (for wrapping)
FONT = "DejaVu Sans"  # bundled with matplotlib: present on a bare machine
MONO = "DejaVu Sans Mono"
MONO_ADVANCE = 0.602  # DejaVu Sans Mono: advance width of every glyph, in em


@dataclass
class Flow:
    """Text flowing down A4 pages; `figure(height)` reserves room for a drawing."""

    pages: list[Figure] = field(default_factory=list)
    y: float = 0.0
    titles: list[tuple[str, int]] = field(default_factory=list)  # section title, page number

    def new_page(self) -> Figure:
        fig = plt.figure(figsize=A4)
        self.pages.append(fig)
        self.y = TOP
        return fig

    @property
    def fig(self) -> Figure:
        return self.pages[-1] if self.pages else self.new_page()

    def room(self, height: float) -> None:
        """A new page unless `height` (figure fraction) still fits on this one."""
        if not self.pages or self.y - height < BOTTOM:
            self.new_page()

    def section(self, title: str, new_page: bool = True) -> None:
        """A section heading, on a new page by default; listed in the contents."""
        if new_page or not self.pages:
            self.new_page()
        else:
            self.room(0.06)
        self.titles.append((title, len(self.pages)))
        self.fig.text(LEFT, self.y, title, fontsize=13, fontweight="bold", va="top", family=FONT)
        self.y -= 24 * PT

    def heading(self, text: str) -> None:
        self.room(0.05)
        self.y -= 4 * PT
        self.fig.text(LEFT, self.y, text, fontsize=10, fontweight="bold", va="top", family=FONT)
        self.y -= 15 * PT

    def para(
        self, text: str, size: float = 8.0, indent: float = 0.0, color: str = "black", mono=False
    ) -> None:
        """A paragraph wrapped to the page width (continues on the next page if need be)."""
        width = int((RIGHT - LEFT - indent) * A4[0] * CHARS_PER_INCH * 8.0 / size * (0.86 if mono else 1.0))
        for line in textwrap.wrap(text, width=max(width, 20), break_long_words=True) or [""]:
            self.room((size + 3) * PT)
            self.fig.text(
                LEFT + indent,
                self.y,
                line,
                fontsize=size,
                va="top",
                color=color,
                family=MONO if mono else FONT,
            )
            self.y -= (size + 3) * PT
        self.y -= 2 * PT

    def lines(self, pairs: list[tuple[str, str]], size: float = 8.0, key_width: float = 0.28) -> None:
        """Key: value lines, the value wrapped beside its key."""
        width = int((RIGHT - LEFT - key_width) * A4[0] * CHARS_PER_INCH * 8.0 / size)
        for key, value in pairs:
            wrapped = textwrap.wrap(str(value), width=max(width, 20)) or [""]
            self.room((size + 3) * PT * len(wrapped))
            self.fig.text(LEFT, self.y, key, fontsize=size, va="top", color="#333333", family=FONT)
            for w in wrapped:
                self.fig.text(LEFT + key_width, self.y, w, fontsize=size, va="top", family=FONT)
                self.y -= (size + 3) * PT
        self.y -= 3 * PT

    def table(
        self,
        header: list[str],
        rows: list[list[str]],
        widths: list[float],
        size: float = 7.0,
        colours: list[str | None] | None = None,
    ) -> None:
        """A table: the header repeated on every page it runs onto; `widths` are fractions of
        the text width; cells are cut to fit (the workbook holds the full text). Each row is one
        line of monospaced text, its cells padded to their columns: one text object per row
        keeps a long table quick to draw (a text object per cell took most of the time)."""
        span = RIGHT - LEFT
        chars = int(span * A4[0] * 72 / (MONO_ADVANCE * size))  # characters across the text width
        room = [max(int(w * chars), 3) for w in widths]
        step = (size + 3.2) * PT

        def line(cells: list[str]) -> str:
            out = []
            for cell, n in zip(cells, room, strict=True):
                text = cell if len(cell) < n else cell[: n - 2] + "…"
                out.append(text.ljust(n))
            return "".join(out).rstrip()

        wrapped = [textwrap.wrap(h, max(n - 1, 2)) or [""] for h, n in zip(header, room, strict=True)]
        depth = min(max(len(w) for w in wrapped), 2)  # a long header takes two lines

        def head() -> None:
            for k in range(depth):
                cells = [w[k] if k < len(w) else "" for w in wrapped]
                if k == depth - 1:  # what did not fit stays on the last line, cut
                    cells = [" ".join(w[k:]) for w in wrapped]
                self.fig.text(
                    LEFT, self.y, line(cells), fontsize=size, fontweight="bold", va="top", family=MONO
                )
                self.y -= step
            self.fig.add_artist(Line2D([LEFT, RIGHT], [self.y + 1.5 * PT] * 2, lw=0.5, color="#555555"))

        self.room(3 * step)
        head()
        for i, row in enumerate(rows):
            if self.y - step < BOTTOM:
                self.new_page()
                head()
            colour = (colours[i] if colours else None) or "black"
            self.fig.text(LEFT, self.y, line(row), fontsize=size, va="top", family=MONO, color=colour)
            self.y -= step
        self.y -= 4 * PT

    def axes(self, height: float, rect: tuple[float, float, float, float] | None = None, below: float = 0.05):
        """An Axes `height` tall (figure fraction) at the cursor, across the text width, with
        room above for its title and `below` for its axis labels."""
        title = 0.025
        self.room(title + height + below)
        left, width = (LEFT + 0.06, RIGHT - LEFT - 0.08) if rect is None else (rect[0], rect[2])
        ax = self.fig.add_axes((left, self.y - title - height, width, height))
        self.y -= title + height + below
        return ax


def frame(pages: list[Figure], header_left: str, header_right: str, footer: str) -> None:
    """Header (project; stamp) and footer (caution; page x of y) on every page."""
    n = len(pages)
    for i, fig in enumerate(pages, start=1):
        fig.text(LEFT, 0.972, header_left, fontsize=7.5, fontweight="bold", va="top", family=FONT)
        fig.text(RIGHT, 0.972, header_right, fontsize=7, va="top", ha="right", family=FONT, color="#333333")
        fig.add_artist(Line2D([LEFT, RIGHT], [0.955, 0.955], lw=0.6, color="#333333"))
        fig.add_artist(Line2D([LEFT, RIGHT], [0.045, 0.045], lw=0.6, color="#333333"))
        fig.text(LEFT, 0.038, footer, fontsize=6.5, va="top", family=FONT, color="#333333")
        fig.text(RIGHT, 0.038, f"Page {i} of {n}", fontsize=7, va="top", ha="right", family=FONT)
