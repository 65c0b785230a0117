// SPDX-License-Identifier: GPL-3.0-or-later
// Output folder checks, atomic file writing and the CSV table builder.
#include <doctest/doctest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <iterator>
#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

#include "cli/errors.hpp"
#include "cli/output/csv.hpp"
#include "cli/output/output_dir.hpp"

namespace fs = std::filesystem;
using namespace voidsign::cli;

namespace {

/// A fresh folder under the system temp folder, removed at scope exit.
struct ScratchDir {
  fs::path path;
  explicit ScratchDir(const std::string& tag)
      : path(fs::temp_directory_path() /
             ("voidsign-out-" + tag + "-" + std::to_string(static_cast<long>(::getpid())))) {
    fs::remove_all(path);
    fs::create_directories(path);
  }
  ~ScratchDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

std::vector<std::string> names_in(const fs::path& dir) {
  std::vector<std::string> out;
  for (const auto& e : fs::directory_iterator(dir)) out.push_back(e.path().filename().string());
  return out;
}

bool has_temp_file(const fs::path& dir) {
  for (const auto& n : names_in(dir))
    if (n.find(".tmp-") != std::string::npos) return true;
  return false;
}

}  // namespace

TEST_CASE("write_text_atomic writes the file and leaves no temporary file") {
  ScratchDir dir("text");
  const fs::path f = dir.path / "summary.json";
  write_text_atomic(f, "{}\n");
  CHECK(slurp(f) == "{}\n");
  CHECK(names_in(dir.path) == std::vector<std::string>{"summary.json"});

  write_text_atomic(f, "{\"a\": 1}\n");  // replaces an existing file
  CHECK(slurp(f) == "{\"a\": 1}\n");
  CHECK(!has_temp_file(dir.path));
}

TEST_CASE("AtomicFile not committed leaves neither the target nor a temporary file") {
  ScratchDir dir("abandon");
  const fs::path f = dir.path / "profile.csv";
  {
    AtomicFile a(f);
    a.write("half a table");
    CHECK(has_temp_file(dir.path));
    CHECK(!fs::exists(f));
  }
  CHECK(!fs::exists(f));
  CHECK(names_in(dir.path).empty());

  // An exception between writing and committing: the old file survives untouched.
  write_text_atomic(f, "old\n");
  try {
    AtomicFile a(f);
    a.write("new");
    throw std::runtime_error("solver gave up");
  } catch (const std::runtime_error&) {
  }
  CHECK(slurp(f) == "old\n");
  CHECK(!has_temp_file(dir.path));
}

TEST_CASE("writing into a missing folder is a WriteError naming the file and the reason") {
  ScratchDir dir("missing");
  const fs::path f = dir.path / "nowhere" / "a.csv";
  try {
    write_text_atomic(f, "x\n");
    FAIL("expected WriteError");
  } catch (const WriteError& e) {
    const std::string what = e.what();
    CHECK(what.find(f.string()) != std::string::npos);
    CHECK(what.find("No such file or directory") != std::string::npos);
  }
}

TEST_CASE("write_atomic renames on success and cleans up on failure") {
  ScratchDir dir("func");
  const fs::path f = dir.path / "field.vtu";

  write_atomic(f, [&dir](const fs::path& tmp) {
    CHECK(tmp.parent_path() == dir.path);
    CHECK(tmp.filename().string().find("field.vtu.tmp-") == 0);
    std::ofstream(tmp) << "data";
  });
  CHECK(slurp(f) == "data");
  CHECK(!has_temp_file(dir.path));

  const fs::path g = dir.path / "broken.vtu";
  try {
    write_atomic(g, [](const fs::path& tmp) {
      std::ofstream(tmp) << "partial";
      throw std::runtime_error("cannot write '" + tmp.string() + "': disk full");
    });
    FAIL("expected WriteError");
  } catch (const WriteError& e) {
    CHECK(std::string(e.what()) == "cannot write '" + g.string() + "': disk full");
  }
  CHECK(!fs::exists(g));
  CHECK(!has_temp_file(dir.path));

  // Input errors pass through unchanged.
  CHECK_THROWS_AS(write_atomic(g, [](const fs::path&) { throw InputError("bad"); }), InputError);
  // A writer that produces nothing is a failure too.
  CHECK_THROWS_AS(write_atomic(g, [](const fs::path&) {}), WriteError);
  CHECK(!fs::exists(g));
}

TEST_CASE("prepare_output_dir creates, accepts empty folders and refuses full ones") {
  ScratchDir dir("prep");
  const fs::path fresh = dir.path / "a" / "b";
  prepare_output_dir(fresh, false);
  CHECK(fs::is_directory(fresh));
  CHECK(names_in(fresh).empty());  // the write probe is gone
  prepare_output_dir(fresh, false);  // empty: fine

  write_text_atomic(fresh / "old.csv", "1\n");
  try {
    prepare_output_dir(fresh, false);
    FAIL("expected InputError");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) == "output folder '" + fresh.string() +
                                       "' exists and is not empty; use --force to overwrite");
  }
  prepare_output_dir(fresh, true);
  CHECK(fs::exists(fresh / "old.csv"));  // force does not wipe the folder

  CHECK_THROWS_AS(prepare_output_dir(fresh / "old.csv", true), InputError);
  CHECK_THROWS_AS(prepare_output_dir("", false), InputError);
}

TEST_CASE("format_number gives the shortest round-trip text") {
  CHECK(format_number(0.1) == "0.1");
  CHECK(format_number(-2.5) == "-2.5");
  CHECK(format_number(0) == "0");
  CHECK(format_number(1e-5) == "1e-05");
  CHECK(format_number(1.0 / 3) == "0.3333333333333333");
  CHECK(std::stod(format_number(1.0 / 3)) == 1.0 / 3);
  CHECK(format_number(std::numeric_limits<double>::quiet_NaN()) == "nan");
  CHECK(format_number(-std::numeric_limits<double>::infinity()) == "-inf");
}

TEST_CASE("CsvTable writes comment lines, column names and rows") {
  CsvTable t({"x_m", "uz_m"});
  t.comment("surface profile");
  t.comment("units: x [m], uz [m]\nuz positive upward");
  t.comment("");
  t.add_row({0.0, -1.25e-4});
  const std::vector<double> row = {0.5, 2.0};
  t.add_row(row);
  CHECK(t.n_rows() == 2);
  CHECK(t.str() ==
        "# surface profile\n"
        "# units: x [m], uz [m]\n"
        "# uz positive upward\n"
        "#\n"
        "x_m,uz_m\n"
        "0,-0.000125\n"
        "0.5,2\n");
  CHECK_THROWS_AS(t.add_row({1.0}), std::invalid_argument);

  CsvTable q({"a,b", "say \"hi\""});
  CHECK(q.str() == "\"a,b\",\"say \"\"hi\"\"\"\n");

  ScratchDir dir("csv");
  t.write(dir.path / "profile.csv");
  CHECK(slurp(dir.path / "profile.csv") == t.str());
  CHECK(!has_temp_file(dir.path));
}
