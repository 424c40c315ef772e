// Writes sample table files and the C++ reader's values as JSON, for tables_python_check.py.
#include "tables/table_file.h"

#include <nlohmann/json.hpp>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>

namespace edgelaw::testing {
extern double family_shift;
LawTable make_family_table(const std::vector<double>& x, const std::vector<double>& w, double beta,
                           double stored_error);
std::vector<double> uniform_axis(double first, double step, int count);
}  // namespace edgelaw::testing

int main(int argc, char** argv) {
  using namespace edgelaw;
  using namespace edgelaw::testing;
  if (argc != 2) {
    std::cerr << "usage: tables_fixture OUTPUT_FOLDER\n";
    return 64;
  }
  try {
    const std::filesystem::path dir(argv[1]);
    std::filesystem::create_directories(dir);
    std::vector<double> w = uniform_axis(-2.0, 0.05, 81);  // the w step the user targets
    w.push_back(kInf);
    const std::vector<double> x = uniform_axis(-8.0, 0.02, 701);
    TableMetadata meta;
    meta.title = "synthetic Gaussian family (test fixture)";
    meta.history = make_history_line("tables_fixture", "0.1.0", argc, argv);
    meta.settings["target_error"] = 1e-10;
    meta.settings["base_intervals"] = std::int64_t{400};
    meta.settings["method"] = std::string("closed form");

    family_shift = 0;
    const std::string law = (dir / "law.h5").string();
    write_table(law, make_family_table(x, w, 2.0, 1e-12), meta);
    std::vector<LawTable> sweep;
    for (double b : {1.0, 2.0, 4.0}) {
      family_shift = 0.2 / b;
      sweep.push_back(make_family_table(x, w, b, 1e-12));
    }
    write_sweep_table((dir / "sweep.h5").string(), sweep, meta);

    // Values through the reader (from the file, not from memory).
    const LawTableFile f = LawTableFile::open(law);
    nlohmann::json out;
    out["law"] = law;
    out["sweep"] = (dir / "sweep.h5").string();
    for (double xv : {-6.0, -3.1, -1.234567, 0.0, 0.77, 2.5, 4.9})
      for (double wv : {-2.0, -1.3, -0.05, 0.0, 1.1, 2.0, kInf}) {
        nlohmann::json p;
        p["x"] = xv;
        p["w"] = wv == kInf ? nlohmann::json("inf") : nlohmann::json(wv);
        p["cdf"] = f.cdf(xv, wv).value;
        p["cdf_error"] = f.cdf(xv, wv).error;
        p["survival"] = f.survival(xv, wv).value;
        p["survival_error"] = f.survival(xv, wv).error;
        p["density"] = f.density(xv, wv).value;
        p["density_error"] = f.density(xv, wv).error;
        out["points"].push_back(p);
      }
    for (double pv : {0.001, 0.05, 0.5, 0.9, 0.999})
      for (double wv : {-1.3, 0.0, kInf}) {
        nlohmann::json q;
        q["probability"] = pv;
        q["w"] = wv == kInf ? nlohmann::json("inf") : nlohmann::json(wv);
        q["quantile"] = f.quantile(pv, wv).value;
        q["quantile_error"] = f.quantile(pv, wv).error;
        out["quantiles"].push_back(q);
      }
    std::ofstream((dir / "reader_values.json").string()) << out.dump(1) << "\n";
  } catch (const std::exception& e) {
    std::cerr << "tables_fixture: " << e.what() << "\n";
    return 1;
  }
  return 0;
}
