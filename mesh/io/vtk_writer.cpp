// SPDX-License-Identifier: GPL-3.0-or-later
// .vtu output through VTK's XML writer: binary appended data, zlib-compressed.
//
// When `keep` filters cells, the points are compacted too: only the nodes used by a kept cell are
// written (renumbered in increasing original order) and point fields are remapped to match, so
// the file's bounds and point count describe what is actually shown.
#include "mesh/io/vtk_writer.hpp"

#include <cstddef>
#include <cstring>
#include <stdexcept>
#include <string>

#include <vtkCallbackCommand.h>
#include <vtkCellArray.h>
#include <vtkCellData.h>
#include <vtkCellType.h>
#include <vtkCommand.h>
#include <vtkDoubleArray.h>
#include <vtkErrorCode.h>
#include <vtkExecutive.h>
#include <vtkIdTypeArray.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkPoints.h>
#include <vtkSmartPointer.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridWriter.h>

namespace voidsign::mesh {
namespace {

[[noreturn]] void fail(const std::filesystem::path& path, const std::string& why) {
  throw std::runtime_error("cannot write '" + path.string() + "': " + why);
}

/// Checks that `f` has `rows` items of f.n_components values each.
void check_field(const std::filesystem::path& path, const Field& f, std::size_t rows,
                 const char* where) {
  if (f.name.empty()) fail(path, std::string(where) + " field without a name");
  if (f.n_components < 1)
    fail(path, std::string(where) + " field '" + f.name + "' has no components");
  if (f.values.size() != rows * static_cast<std::size_t>(f.n_components))
    fail(path, std::string(where) + " field '" + f.name + "' has " +
                   std::to_string(f.values.size()) + " values, expected " +
                   std::to_string(rows) + " x " + std::to_string(f.n_components));
}

/// Copies the rows of `f` listed in `rows` (all rows, in order, when `rows` is null).
vtkSmartPointer<vtkDoubleArray> make_array(const Field& f, const std::vector<std::size_t>* rows,
                                           std::size_t n_rows) {
  auto a = vtkSmartPointer<vtkDoubleArray>::New();
  const auto nc = static_cast<std::size_t>(f.n_components);
  a->SetName(f.name.c_str());
  a->SetNumberOfComponents(f.n_components);
  a->SetNumberOfTuples(static_cast<vtkIdType>(n_rows));
  double* out = a->GetPointer(0);
  for (std::size_t r = 0; r < n_rows; ++r) {
    const std::size_t src = rows ? (*rows)[r] : r;
    for (std::size_t k = 0; k < nc; ++k) out[r * nc + k] = f.values[src * nc + k];
  }
  return a;
}

/// Keeps the first message VTK reports through ErrorEvent, instead of letting them go to stderr.
void collect_error(vtkObject*, unsigned long, void* client_data, void* call_data) {
  auto* text = static_cast<std::string*>(client_data);
  std::string msg = call_data ? static_cast<const char*>(call_data) : "unknown VTK error";
  // Drop the "ClassName (0x...): " prefix and trailing line breaks.
  if (const auto p = msg.find("): "); p != std::string::npos) msg.erase(0, p + 3);
  while (!msg.empty() && (msg.back() == '\n' || msg.back() == '\r' || msg.back() == ' '))
    msg.pop_back();
  if (text->empty()) *text = msg;  // the first message is the cause; later ones are echoes
}

/// One short reason for a failed write: the system's, when VTK has an errno, else VTK's first
/// message.
std::string failure_reason(unsigned long code, const std::string& first_message) {
  if (code != vtkErrorCode::NoError && code < vtkErrorCode::FirstVTKErrorCode)
    return std::strerror(static_cast<int>(code));
  if (code == vtkErrorCode::OutOfDiskSpaceError) return "out of disk space";
  if (!first_message.empty()) return first_message;
  // (vtkErrorCode's own texts live in VTK::CommonMisc, which this library does not link.)
  if (code != vtkErrorCode::NoError)
    return "VTK writer failed with error code " + std::to_string(code);
  return "VTK writer failed";
}

/// VTK's cell type for ours; Mesh already uses VTK's node order.
int vtk_cell_type(CellType t) {
  switch (t) {
    case CellType::tri3: return VTK_TRIANGLE;
    case CellType::tri6: return VTK_QUADRATIC_TRIANGLE;
    case CellType::tet4: return VTK_TETRA;
    case CellType::tet10: return VTK_QUADRATIC_TETRA;
  }
  return VTK_EMPTY_CELL;
}

}  // namespace

void write_vtu(const std::filesystem::path& path, const Mesh& m,
               const std::vector<Field>& point_fields, const std::vector<Field>& cell_fields,
               const std::vector<bool>* keep) {
  const std::size_t n_cells = m.n_cells();
  const std::size_t n_nodes = m.n_nodes();
  const auto npc = static_cast<std::size_t>(m.npc());
  if (m.cells.size() != n_cells * npc)
    fail(path, "mesh has " + std::to_string(m.cells.size()) + " cell node indices for " +
                   std::to_string(n_cells) + " cells");
  if (keep && keep->size() != n_cells)
    fail(path, "cell filter has " + std::to_string(keep->size()) + " entries for " +
                   std::to_string(n_cells) + " cells");
  for (const Field& f : point_fields) check_field(path, f, n_nodes, "point");
  for (const Field& f : cell_fields) check_field(path, f, n_cells, "cell");
  for (int id : m.cells)
    if (id < 0 || static_cast<std::size_t>(id) >= n_nodes)
      fail(path, "cell refers to node " + std::to_string(id) + " of " + std::to_string(n_nodes));

  // Kept cells and, when filtering, the kept nodes and their new numbers.
  std::vector<std::size_t> cell_rows;
  std::vector<std::size_t> node_rows;
  std::vector<vtkIdType> new_id;
  if (keep) {
    for (std::size_t c = 0; c < n_cells; ++c)
      if ((*keep)[c]) cell_rows.push_back(c);
    std::vector<bool> used(n_nodes, false);
    for (std::size_t c : cell_rows)
      for (std::size_t k = 0; k < npc; ++k)
        used[static_cast<std::size_t>(m.cells[c * npc + k])] = true;
    new_id.assign(n_nodes, -1);
    for (std::size_t i = 0; i < n_nodes; ++i)
      if (used[i]) {
        new_id[i] = static_cast<vtkIdType>(node_rows.size());
        node_rows.push_back(i);
      }
  }
  const std::size_t out_cells = keep ? cell_rows.size() : n_cells;
  const std::size_t out_nodes = keep ? node_rows.size() : n_nodes;

  vtkNew<vtkPoints> points;
  points->SetDataTypeToDouble();
  points->SetNumberOfPoints(static_cast<vtkIdType>(out_nodes));
  for (std::size_t i = 0; i < out_nodes; ++i) {
    const Point& p = m.nodes[keep ? node_rows[i] : i];
    points->SetPoint(static_cast<vtkIdType>(i), p[0], p[1], p[2]);
  }

  vtkNew<vtkIdTypeArray> offsets;
  vtkNew<vtkIdTypeArray> connectivity;
  offsets->SetNumberOfValues(static_cast<vtkIdType>(out_cells + 1));
  connectivity->SetNumberOfValues(static_cast<vtkIdType>(out_cells * npc));
  for (std::size_t c = 0; c <= out_cells; ++c)
    offsets->SetValue(static_cast<vtkIdType>(c), static_cast<vtkIdType>(c * npc));
  for (std::size_t c = 0; c < out_cells; ++c) {
    const std::size_t src = keep ? cell_rows[c] : c;
    for (std::size_t k = 0; k < npc; ++k) {
      const int id = m.cells[src * npc + k];
      connectivity->SetValue(static_cast<vtkIdType>(c * npc + k),
                             keep ? new_id[static_cast<std::size_t>(id)] : vtkIdType{id});
    }
  }
  vtkNew<vtkCellArray> cells;
  cells->SetData(offsets, connectivity);

  vtkNew<vtkUnstructuredGrid> grid;
  grid->SetPoints(points);
  grid->SetCells(vtk_cell_type(m.type), cells);
  for (const Field& f : point_fields)
    grid->GetPointData()->AddArray(make_array(f, keep ? &node_rows : nullptr, out_nodes));
  for (const Field& f : cell_fields)
    grid->GetCellData()->AddArray(make_array(f, keep ? &cell_rows : nullptr, out_cells));

  std::string vtk_error;  // first error message VTK reported
  vtkNew<vtkCallbackCommand> on_error;
  on_error->SetCallback(collect_error);
  on_error->SetClientData(&vtk_error);

  vtkNew<vtkXMLUnstructuredGridWriter> writer;
  writer->AddObserver(vtkCommand::ErrorEvent, on_error);
  writer->GetExecutive()->AddObserver(vtkCommand::ErrorEvent, on_error);  // pipeline failure
  writer->SetFileName(path.string().c_str());
  writer->SetInputData(grid);
  writer->SetDataModeToAppended();
  writer->EncodeAppendedDataOff();
  writer->SetCompressorTypeToZLib();
  // zlib's fastest level: the files grow by a few per cent against the default level 5 and
  // are written several times faster (docs/benchmarks.md).
  writer->SetCompressionLevel(1);
  writer->SetHeaderTypeToUInt64();
  const int ok = writer->Write();
  const unsigned long code = writer->GetErrorCode();
  if (ok != 1 || code != vtkErrorCode::NoError || !vtk_error.empty())
    fail(path, failure_reason(code, vtk_error));
}

}  // namespace voidsign::mesh
