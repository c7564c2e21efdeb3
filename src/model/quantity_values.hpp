// A device's operating-point quantities by name ("gm" -> 1.2e-4), sorted by name. A flat
// vector rather than a std::map: a device has a dozen or two of them and a circuit tens of
// thousands of devices, so a node per value was most of an operating point's memory.
#pragma once

#include <algorithm>
#include <cstddef>
#include <initializer_list>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace mirrorcheck {

class QuantityValues {
public:
    using value_type = std::pair<std::string, double>;
    using const_iterator = std::vector<value_type>::const_iterator;

    QuantityValues() = default;
    QuantityValues(std::initializer_list<value_type> values) { insert(values); }
    QuantityValues& operator=(std::initializer_list<value_type> values) {
        entries_.clear();
        insert(values);
        return *this;
    }

    // The value stored under `name`, made 0 first when there is none.
    double& operator[](std::string_view name) {
        auto it = lower(name);
        if (it == entries_.end() || it->first != name) it = entries_.emplace(it, std::string(name), 0.0);
        return it->second;
    }
    // Adds each value whose name is not there yet (as std::map::insert does).
    void insert(std::initializer_list<value_type> values) {
        for (const auto& [name, value] : values) {
            auto it = lower(name);
            if (it == entries_.end() || it->first != name) entries_.emplace(it, name, value);
        }
    }
    std::size_t erase(std::string_view name) {
        auto it = lower(name);
        if (it == entries_.end() || it->first != name) return 0;
        entries_.erase(it);
        return 1;
    }

    const_iterator find(std::string_view name) const {
        auto it = std::lower_bound(entries_.begin(), entries_.end(), name, Less{});
        return it != entries_.end() && it->first == name ? it : entries_.end();
    }
    std::size_t count(std::string_view name) const { return find(name) == end() ? 0 : 1; }
    const_iterator begin() const { return entries_.begin(); }
    const_iterator end() const { return entries_.end(); }
    std::size_t size() const { return entries_.size(); }
    bool empty() const { return entries_.empty(); }
    bool operator==(const QuantityValues&) const = default;

private:
    struct Less {
        bool operator()(const value_type& e, std::string_view name) const { return e.first < name; }
    };
    std::vector<value_type> entries_;

    std::vector<value_type>::iterator lower(std::string_view name) {
        return std::lower_bound(entries_.begin(), entries_.end(), name, Less{});
    }
};

}  // namespace mirrorcheck
