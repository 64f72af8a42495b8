"""Quadratic tetrahedral (tet10) mesh of an invented rubber spring, written in
the Gmsh MSH 4.1 format that `olli` imports.

The part: a rubber block 40 mm long (x), 30 mm wide (y) and 20 mm high (z),
its four vertical edges rounded with 6 mm fillets and a 10 mm hole through
it along z at the centre. It is bonded to plates at z = 0 and z = 20.

Named groups (they become olli's sets):
  rubber   the volume (element set)
  bottom   the face at z = 0 (side set and node set)
  top      the face at z = 20
  hole     the hole's wall

Run it with Python 3 and the `gmsh` package from PyPI
(`pip install gmsh`); the mesh committed beside it was made with gmsh 4.15.2:

    python3 spring_tet10.py [size] [output]

The default element size, 8 mm, gives a few hundred tet10 elements. The test
suite reads the committed file and never runs this script.
"""

import math
import sys

import gmsh

LENGTH, WIDTH, HEIGHT = 40.0, 30.0, 20.0
FILLET = 6.0
HOLE_DIAMETER = 10.0


def build(size: float, output: str) -> None:
    gmsh.initialize()
    gmsh.option.setNumber("General.Terminal", 0)
    gmsh.model.add("spring")
    occ = gmsh.model.occ
    box = occ.addBox(0.0, 0.0, 0.0, LENGTH, WIDTH, HEIGHT)
    occ.synchronize()
    vertical = []
    for dim, tag in gmsh.model.getEntities(1):
        x0, y0, z0, x1, y1, z1 = gmsh.model.getBoundingBox(dim, tag)
        if abs(x1 - x0) < 1e-3 and abs(y1 - y0) < 1e-3:
            vertical.append(tag)
    filleted = occ.fillet([box], vertical, [FILLET])
    hole = occ.addCylinder(LENGTH / 2, WIDTH / 2, -1.0, 0.0, 0.0, HEIGHT + 2.0, HOLE_DIAMETER / 2)
    part, _ = occ.cut([(3, t) for _, t in filleted], [(3, hole)])
    occ.synchronize()

    volume = part[0][1]
    bottom, top, wall = [], [], []
    for _, tag in gmsh.model.getBoundary(part, oriented=False):
        x0, y0, z0, x1, y1, z1 = gmsh.model.getBoundingBox(2, tag)
        if z1 < 1e-3:
            bottom.append(tag)
        elif z0 > HEIGHT - 1e-3:
            top.append(tag)
        elif abs(0.5 * (x0 + x1) - LENGTH / 2) < 1.0 and abs(0.5 * (y0 + y1) - WIDTH / 2) < 1.0:
            wall.append(tag)
    for dim, tags, name in [(3, [volume], "rubber"), (2, bottom, "bottom"), (2, top, "top"), (2, wall, "hole")]:
        gmsh.model.setPhysicalName(dim, gmsh.model.addPhysicalGroup(dim, tags), name)

    gmsh.option.setNumber("Mesh.MeshSizeMax", size)
    gmsh.option.setNumber("Mesh.MeshSizeMin", 0.5 * size)
    gmsh.option.setNumber("Mesh.MeshSizeFromCurvature", 6)
    gmsh.option.setNumber("Mesh.ElementOrder", 2)
    # Mid-edge nodes on the curved walls go onto the geometry; keep elements valid.
    gmsh.option.setNumber("Mesh.HighOrderOptimize", 2)
    gmsh.option.setNumber("Mesh.MshFileVersion", 4.1)
    gmsh.option.setNumber("Mesh.Binary", 0)
    gmsh.model.mesh.generate(3)
    gmsh.write(output)
    gmsh.finalize()


if __name__ == "__main__":
    size = float(sys.argv[1]) if len(sys.argv) > 1 else 8.0
    output = sys.argv[2] if len(sys.argv) > 2 else "spring_tet10.msh"
    expected = (LENGTH * WIDTH - (4.0 - math.pi) * FILLET**2 - math.pi * HOLE_DIAMETER**2 / 4.0) * HEIGHT
    build(size, output)
    print(f"wrote {output}; exact volume {expected:.3f} mm^3")
