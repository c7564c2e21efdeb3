// The results of a pass looked up by output in constant time: by node, or by mirror and
// node (the first of equal keys), for the passes that join other passes' results per output.
#pragma once

#include <string>
#include <unordered_map>
#include <vector>

#include "parsers/common/text.hpp"

namespace mirrorcheck {

// Over values with a `node` (compared in lower case).
template <typename T>
class ByNode {
public:
    explicit ByNode(const std::vector<T>& values) {
        for (const T& v : values) map_.emplace(to_lower(v.node), &v);
    }
    const T* find(const std::string& node) const {
        auto it = map_.find(to_lower(node));
        return it == map_.end() ? nullptr : it->second;
    }

private:
    std::unordered_map<std::string, const T*> map_;
};

// Over values with a `mirror` (Mirror::id) and a `node` (compared in lower case).
template <typename T>
class ByMirrorNode {
public:
    explicit ByMirrorNode(const std::vector<T>& values) {
        for (const T& v : values) map_.emplace(key(v.mirror, to_lower(v.node)), &v);
    }
    const T* find(const std::string& mirror, const std::string& node) const {
        auto it = map_.find(key(mirror, to_lower(node)));
        return it == map_.end() ? nullptr : it->second;
    }

private:
    static std::string key(const std::string& mirror, const std::string& node) { return mirror + '\n' + node; }
    std::unordered_map<std::string, const T*> map_;
};

}  // namespace mirrorcheck
