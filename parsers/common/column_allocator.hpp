// An allocator for the large value columns that front ends fill: memory that every value
// is written into before it is read, so it is left uninitialised, and large blocks come
// from the kernel in transparent huge pages.
//
// Why: on virtual machines the first write to each new 4 KiB page costs microseconds;
// decoding a 170 MB raw file into fresh columns spent most of its time in page faults
// (measured in tests/bench: about 0.9 s of 1.2 s). Huge pages make that 512 times rarer.
// Under AddressSanitizer the ordinary allocator is used, so the sanitizer sees every block.
#pragma once

#include <cstddef>
#include <new>
#include <utility>

namespace mirrorcheck {

namespace detail {
void* allocate_large_block(std::size_t bytes);
void free_large_block(void* p, std::size_t bytes);
bool use_large_blocks(std::size_t bytes);
}  // namespace detail

template <typename T>
struct ColumnAllocator {
    using value_type = T;

    ColumnAllocator() = default;
    template <typename U>
    ColumnAllocator(const ColumnAllocator<U>&) {}

    T* allocate(std::size_t n) {
        const std::size_t bytes = n * sizeof(T);
        if (detail::use_large_blocks(bytes)) return static_cast<T*>(detail::allocate_large_block(bytes));
        return static_cast<T*>(::operator new(bytes, std::align_val_t{alignof(T)}));
    }

    void deallocate(T* p, std::size_t n) {
        const std::size_t bytes = n * sizeof(T);
        if (detail::use_large_blocks(bytes)) detail::free_large_block(p, bytes);
        else ::operator delete(p, std::align_val_t{alignof(T)});
    }

    // Default-initialises (leaves doubles unwritten) where a container would zero them.
    template <typename U, typename... Args>
    void construct(U* p, Args&&... args) {
        if constexpr (sizeof...(Args) == 0) ::new (static_cast<void*>(p)) U;
        else ::new (static_cast<void*>(p)) U(std::forward<Args>(args)...);
    }

    template <typename U>
    bool operator==(const ColumnAllocator<U>&) const { return true; }
};

}  // namespace mirrorcheck
