// Test support: the shared corpus of third-party decks (../shared/corpus), read in place.
#pragma once

#include <filesystem>

#include <doctest/doctest.h>

namespace mirrorcheck::test {

inline std::filesystem::path corpus_dir() {
    return std::filesystem::path(MIRRORCHECK_SOURCE_DIR) / ".." / "shared" / "corpus";
}

// True when the corpus is there; else the test says "skipped".
inline bool corpus_present() {
    if (std::filesystem::is_directory(corpus_dir())) return true;
    MESSAGE("skipped: no corpus at " << corpus_dir().string());
    return false;
}

}  // namespace mirrorcheck::test
