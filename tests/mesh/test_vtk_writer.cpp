// SPDX-License-Identifier: GPL-3.0-or-later
// write_vtu: written files read back with VTK's own reader.
#include <doctest/doctest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <iterator>
#include <stdexcept>
#include <string>

#include <vtkCellData.h>
#include <vtkCellType.h>
#include <vtkDataArray.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridReader.h>

#include "mesh/io/vtk_writer.hpp"

namespace fs = std::filesystem;
using voidsign::mesh::CellType;
using voidsign::mesh::Field;
using voidsign::mesh::Mesh;

namespace {

/// A fresh folder under the system temp folder, removed at scope exit.
struct ScratchDir {
  fs::path path;
  explicit ScratchDir(const std::string& tag)
      : path(fs::temp_directory_path() /
             ("voidsign-vtk-" + tag + "-" + std::to_string(static_cast<long>(::getpid())))) {
    fs::remove_all(path);
    fs::create_directories(path);
  }
  ~ScratchDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

/// The unit square [0,1] x [-1,0] (x, z) cut along its diagonal into two tri6 cells.
///   3 --- 2      z = 0
///   |   / |
///   | /   |
///   0 --- 1      z = -1
Mesh two_tri6() {
  Mesh m;
  m.type = CellType::tri6;
  m.nodes = {{0, 0, -1},   {1, 0, -1},   {1, 0, 0},  {0, 0, 0},     // corners 0..3
             {0.5, 0, -1}, {1, 0, -0.5}, {0.5, 0, -0.5},            // 01, 12, 20 (= 02)
             {0.5, 0, 0},  {0, 0, -0.5}};                           // 23, 30
  m.cells = {0, 1, 2, 4, 5, 6,   // cell 0: 0 1 2 | 01 12 20
             0, 2, 3, 6, 7, 8};  // cell 1: 0 2 3 | 02 23 30
  m.layer = {0, 1};
  m.void_id = {-1, 0};
  m.n_voids = 1;
  return m;
}

/// Displacement-like point vector (x, 0, 10 z + 1) and a cell scalar (7, 8).
void fields(const Mesh& m, Field& u, Field& c) {
  u = Field{"u", 3, {}};
  for (const auto& p : m.nodes) u.values.insert(u.values.end(), {p[0], 0.0, 10 * p[2] + 1});
  c = Field{"tag", 1, {7, 8}};
}

vtkNew<vtkXMLUnstructuredGridReader> read(const fs::path& p) {
  vtkNew<vtkXMLUnstructuredGridReader> r;
  r->SetFileName(p.c_str());
  r->Update();
  return r;
}

}  // namespace

TEST_CASE("write_vtu writes a tri6 mesh with point and cell fields that VTK reads back") {
  ScratchDir dir("tri6");
  const Mesh m = two_tri6();
  Field u, tag;
  fields(m, u, tag);
  const fs::path file = dir.path / "two.vtu";
  voidsign::mesh::write_vtu(file, m, {u}, {tag});

  auto reader = read(file);
  vtkUnstructuredGrid* g = reader->GetOutput();
  REQUIRE(g != nullptr);
  CHECK(g->GetNumberOfPoints() == 9);
  CHECK(g->GetNumberOfCells() == 2);
  CHECK(g->GetCellType(0) == VTK_QUADRATIC_TRIANGLE);
  CHECK(g->GetCellType(1) == VTK_QUADRATIC_TRIANGLE);
  // Node order is preserved: second cell's fourth node is the diagonal midpoint 6.
  CHECK(g->GetCell(1)->GetPointId(3) == 6);
  double p[3];
  g->GetPoint(5, p);
  CHECK(p[0] == 1.0);
  CHECK(p[1] == 0.0);
  CHECK(p[2] == -0.5);

  vtkDataArray* ua = g->GetPointData()->GetArray("u");
  REQUIRE(ua != nullptr);
  CHECK(ua->GetNumberOfComponents() == 3);
  CHECK(ua->GetNumberOfTuples() == 9);
  CHECK(ua->GetComponent(5, 2) == doctest::Approx(-4.0));
  vtkDataArray* ta = g->GetCellData()->GetArray("tag");
  REQUIRE(ta != nullptr);
  CHECK(ta->GetNumberOfComponents() == 1);
  CHECK(ta->GetComponent(1, 0) == 8.0);

  // Binary appended, compressed with zlib, not base64-encoded.
  std::ifstream in(file, std::ios::binary);
  const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  CHECK(text.find("compressor=\"vtkZLibDataCompressor\"") != std::string::npos);
  CHECK(text.find("format=\"appended\"") != std::string::npos);
  CHECK(text.find("encoding=\"raw\"") != std::string::npos);
}

TEST_CASE("write_vtu with a cell filter keeps only the chosen cells and their nodes") {
  ScratchDir dir("keep");
  const Mesh m = two_tri6();
  Field u, tag;
  fields(m, u, tag);
  const std::vector<bool> keep = {false, true};
  const fs::path file = dir.path / "kept.vtu";
  voidsign::mesh::write_vtu(file, m, {u}, {tag}, &keep);

  auto reader = read(file);
  vtkUnstructuredGrid* g = reader->GetOutput();
  CHECK(g->GetNumberOfCells() == 1);
  CHECK(g->GetNumberOfPoints() == 6);  // nodes 0 2 3 6 7 8
  CHECK(g->GetCellData()->GetArray("tag")->GetComponent(0, 0) == 8.0);
  // Kept nodes keep their original order: new 3 is old 6 at (0.5, 0, -0.5).
  double p[3];
  g->GetPoint(g->GetCell(0)->GetPointId(3), p);
  CHECK(p[0] == 0.5);
  CHECK(p[2] == -0.5);
  CHECK(g->GetPointData()->GetArray("u")->GetComponent(3, 2) == doctest::Approx(-4.0));
}

TEST_CASE("write_vtu writes tri3 cells as VTK_TRIANGLE") {
  ScratchDir dir("tri3");
  Mesh m;
  m.type = CellType::tri3;
  m.nodes = {{0, 0, -1}, {1, 0, -1}, {1, 0, 0}, {0, 0, 0}};
  m.cells = {0, 1, 2, 0, 2, 3};
  m.layer = {0, 0};
  m.void_id = {-1, -1};
  const fs::path file = dir.path / "tri3.vtu";
  voidsign::mesh::write_vtu(file, m, {}, {});
  auto reader = read(file);
  CHECK(reader->GetOutput()->GetNumberOfCells() == 2);
  CHECK(reader->GetOutput()->GetCellType(1) == VTK_TRIANGLE);
}

TEST_CASE("write_vtu throws on bad field sizes and on writer failure") {
  ScratchDir dir("fail");
  const Mesh m = two_tri6();
  Field u, tag;
  fields(m, u, tag);
  Field short_field{"short", 1, {1.0}};
  CHECK_THROWS_AS(voidsign::mesh::write_vtu(dir.path / "a.vtu", m, {short_field}, {}),
                  std::runtime_error);
  CHECK_THROWS_AS(voidsign::mesh::write_vtu(dir.path / "b.vtu", m, {}, {short_field}),
                  std::runtime_error);
  const std::vector<bool> wrong_keep(3, true);
  CHECK_THROWS_AS(voidsign::mesh::write_vtu(dir.path / "c.vtu", m, {}, {}, &wrong_keep),
                  std::runtime_error);

  const fs::path missing = dir.path / "no-such-folder" / "x.vtu";
  try {
    voidsign::mesh::write_vtu(missing, m, {u}, {tag});
    FAIL("expected an exception");
  } catch (const std::runtime_error& e) {
    const std::string what = e.what();
    CHECK(what.find(missing.string()) != std::string::npos);
    CHECK(what.find("0x") == std::string::npos);  // VTK's object address is stripped
  }
  CHECK(!fs::exists(missing));
}
