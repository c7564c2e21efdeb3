// For the readers: a hash index of ids whose keys live elsewhere (a vector of names, the
// devices, a raw file's variables), so that a million names cost a few bytes each rather
// than a node and a copy each. Open addressing, linear probing, kept at most half full; the
// last few ids inserted or found by insert() are remembered, as netlists name a net on
// neighbouring lines.
#pragma once

#include <array>
#include <cstdint>
#include <functional>
#include <string_view>
#include <vector>

namespace mirrorcheck {

class IdTable {
public:
    static constexpr std::uint32_t none = 0xffffffff;

    // Stores `id` under `key` unless an equal key is there; returns the id stored for it.
    template <class KeyOf>
    std::uint32_t insert(std::string_view key, std::uint32_t id, const KeyOf& key_of) {
        return insert_hashed(key, hash(key), id, key_of);
    }

    // The key's hash, having asked the processor to fetch the slot where its search will
    // start: a caller with other work to do before inserting hides the cache miss behind it.
    std::uint32_t prefetch(std::string_view key) const {
        const std::uint32_t h = hash(key);
        if (!slots_.empty()) __builtin_prefetch(&slots_[h & mask_]);
        return h;
    }

    // insert() with the hash prefetch() returned.
    template <class KeyOf>
    std::uint32_t insert_hashed(std::string_view key, std::uint32_t h, std::uint32_t id, const KeyOf& key_of) {
        Slot& r = recent_[h % recent_size];
        if (r.id != none && r.hash == h && key_of(r.id) == key) return r.id;
        if (2 * (count_ + 1) > slots_.size()) grow();
        for (std::size_t i = h & mask_;; i = (i + 1) & mask_) {
            Slot& s = slots_[i];
            if (s.id == none) {
                s = {id, h};
                ++count_;
                r = s;
                return id;
            }
            if (s.hash == h && key_of(s.id) == key) {
                r = s;
                return s.id;
            }
        }
    }

    // The id stored under `key`, or `none`.
    template <class KeyOf>
    std::uint32_t find(std::string_view key, const KeyOf& key_of) const {
        if (slots_.empty()) return none;
        const std::uint32_t h = hash(key);
        for (std::size_t i = h & mask_;; i = (i + 1) & mask_) {
            const Slot& s = slots_[i];
            if (s.id == none) return none;
            if (s.hash == h && key_of(s.id) == key) return s.id;
        }
    }

    void reserve(std::size_t keys) {
        while (2 * keys > slots_.size()) grow();
    }

private:
    struct Slot {
        std::uint32_t id = none;
        std::uint32_t hash = 0;
    };
    static constexpr std::size_t recent_size = 251;
    std::vector<Slot> slots_;
    std::array<Slot, recent_size> recent_{};
    std::size_t mask_ = 0;
    std::size_t count_ = 0;

    static std::uint32_t hash(std::string_view key) {
        const std::size_t h = std::hash<std::string_view>{}(key);
        return static_cast<std::uint32_t>(h ^ (h >> 32));
    }

    void grow() {
        std::vector<Slot> old = std::move(slots_);
        slots_.assign(old.empty() ? 64 : 2 * old.size(), Slot{});
        mask_ = slots_.size() - 1;
        for (const Slot& s : old) {
            if (s.id == none) continue;
            std::size_t i = s.hash & mask_;
            while (slots_[i].id != none) i = (i + 1) & mask_;
            slots_[i] = s;
        }
    }
};

}  // namespace mirrorcheck
