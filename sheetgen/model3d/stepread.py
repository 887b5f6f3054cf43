"""Reading a written STEP assembly back: its named solids and the group each sits in.

The reader knows nothing of the kit: it walks the file's product tree (OpenCascade's
XCAF reader keeps the product names) and returns every leaf solid, placed by the
product of the locations on its way down, with the name of its own product
(``base#1``, ``panel``) and of the sub-assembly that holds it (``fixed``,
``rotating``). It is the way a test or a user's script checks the kit from the file
alone, without the code that wrote it.

Pure I/O: OpenCascade (OCP, under cadquery) is imported inside the functions only.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any

from sheetgen.errors import InputFileError


@dataclass(frozen=True)
class StepSolid:
    """One leaf solid of a STEP assembly, in the file's frame (millimetres)."""

    name: str  # the product's name
    group: str  # the name of the assembly that holds it ("" at the top level)
    path: tuple[str, ...]  # the names from the top assembly down to the solid
    shape: Any  # an OCP TopoDS_Shape, already placed

    def solid(self) -> Any:
        """The shape as a cadquery Shape (for its measures and booleans)."""
        import cadquery as cq

        return cq.Shape.cast(self.shape)


def _label_name(label: Any) -> str:
    from OCP.TDataStd import TDataStd_Name

    attr = TDataStd_Name()
    if label.FindAttribute(TDataStd_Name.GetID_s(), attr):
        return str(attr.Get().ToExtString())
    return ""


def read_step_solids(path: str | Path) -> tuple[StepSolid, ...]:
    """Every leaf solid of the STEP file at ``path``, in file order, with its name and group.

    Raises InputFileError when the file cannot be read as STEP."""
    from OCP.IFSelect import IFSelect_RetDone
    from OCP.STEPCAFControl import STEPCAFControl_Reader
    from OCP.TCollection import TCollection_ExtendedString
    from OCP.TDF import TDF_Label, TDF_LabelSequence
    from OCP.TDocStd import TDocStd_Document
    from OCP.TopLoc import TopLoc_Location
    from OCP.XCAFDoc import XCAFDoc_DocumentTool, XCAFDoc_ShapeTool

    p = Path(path)
    if not p.is_file():
        raise InputFileError(f"{p}: no such STEP file")
    doc = TDocStd_Document(TCollection_ExtendedString("sheetgen-step-read"))
    reader = STEPCAFControl_Reader()
    reader.SetNameMode(True)
    if reader.ReadFile(str(p)) != IFSelect_RetDone or not reader.Transfer(doc):
        raise InputFileError(f"{p}: not a readable STEP file")
    tool = XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())
    out: list[StepSolid] = []

    def walk(label: Any, loc: Any, names: tuple[str, ...]) -> None:
        if XCAFDoc_ShapeTool.IsReference_s(label):
            referred = TDF_Label()
            XCAFDoc_ShapeTool.GetReferredShape_s(label, referred)
            here = loc.Multiplied(XCAFDoc_ShapeTool.GetLocation_s(label))
            walk(referred, here, names)
            return
        name = _label_name(label)
        if XCAFDoc_ShapeTool.IsAssembly_s(label):
            comps = TDF_LabelSequence()
            XCAFDoc_ShapeTool.GetComponents_s(label, comps)
            for i in range(1, comps.Length() + 1):
                walk(comps.Value(i), loc, names + (name,))
            return
        shape = XCAFDoc_ShapeTool.GetShape_s(label)
        if shape.IsNull():
            return
        placed = shape.Moved(loc)
        out.append(StepSolid(name, names[-1] if names else "", names + (name,), placed))

    free = TDF_LabelSequence()
    tool.GetFreeShapes(free)
    for i in range(1, free.Length() + 1):
        top = free.Value(i)
        walk(top, TopLoc_Location(), ())
    if not out:
        raise InputFileError(f"{p}: the STEP file holds no solid")
    return tuple(out)
