"""Section mechanics, apart from any design standard and from the workbook.

- `section`: polygon properties of a core (area, centroid, second moments, principal axes).
- `stiffness`: a pier's lateral stiffness (bending + shear) and the EI of a storey.
- `diaphragm`: the rigid-floor solve that shares a storey's shear and torsion among springs.
- `nm`: strain-compatibility N-M of a rectangular pier (closed-form sums for evenly spaced bars).
- `nm_core`: biaxial N-M of a whole core by fibres.
- `bars`: where the bars of a pier are (field bars and end-zone groups).
- `radial`: the radial overload factor on the straight parts of an interaction diagram.

A standard's numbers (stress block, strain limit, phi) come in as arguments; nothing here
imports `xlcore.codes` except `stiffness` for Ec, which every standard shares as an input.
"""
