// Test support: validates a JSON report against the project's schema file
// (docs/report.schema.json, docs/sweep.schema.json) with Python's jsonschema (Debian's python3-jsonschema), a
// validator that is not ours. Every test that makes a report checks it with this.
#pragma once

#include <cstdio>
#include <filesystem>
#include <string>

#include "support/ngspice_run.hpp"

namespace mirrorcheck::test {

inline const char* const validate_report_py = R"PY(
import json, sys
import jsonschema
schema = json.load(open(sys.argv[1], encoding="utf-8"))
cls = jsonschema.validators.validator_for(schema)
cls.check_schema(schema)
report = json.load(open(sys.argv[2], encoding="utf-8"))
errors = sorted(cls(schema).iter_errors(report), key=lambda e: list(e.absolute_path))
for e in errors[:20]:
    print("/".join(str(p) for p in e.absolute_path) + ": " + e.message[:300])
sys.exit(1 if errors else 0)
)PY";

// The complaints of docs/`schema_file` about `report` (one per line), or "" when it is valid.
inline std::string schema_errors(const std::string& report, const std::string& schema_file) {
    const auto dir = make_temp_dir("mc-schema");
    write_text(dir / "validate.py", validate_report_py);
    write_text(dir / "report.json", report);
    const std::filesystem::path schema = std::filesystem::path(MIRRORCHECK_SOURCE_DIR) / "docs" / schema_file;
    const std::string cmd = "python3 '" + (dir / "validate.py").string() + "' '" + schema.string() + "' '" +
                            (dir / "report.json").string() + "' > '" + (dir / "out.txt").string() + "' 2>&1";
    const int status = std::system(cmd.c_str());
    std::string out = read_text(dir / "out.txt");
    std::filesystem::remove_all(dir);
    if (status != 0 && out.empty()) out = "the validator failed to run";
    return status == 0 ? std::string() : out;
}

// The complaints of docs/report.schema.json (review reports).
inline std::string report_schema_errors(const std::string& report) { return schema_errors(report, "report.schema.json"); }

// The complaints of docs/sweep.schema.json (sweep and merge reports).
inline std::string sweep_schema_errors(const std::string& report) { return schema_errors(report, "sweep.schema.json"); }

}  // namespace mirrorcheck::test
