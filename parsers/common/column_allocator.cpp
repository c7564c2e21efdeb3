#include "parsers/common/column_allocator.hpp"

#include <cstdint>
#include <new>

#include <sys/mman.h>

namespace mirrorcheck::detail {
namespace {

constexpr std::size_t huge_page = std::size_t{2} << 20;

std::size_t round_up(std::size_t bytes) { return (bytes + huge_page - 1) / huge_page * huge_page; }

}  // namespace

bool use_large_blocks(std::size_t bytes) {
#if defined(__SANITIZE_ADDRESS__)
    (void)bytes;
    return false;
#else
    return bytes >= huge_page;
#endif
}

// Maps a little more than asked, keeps a huge-page-aligned part and returns the rest,
// so that the kernel can back the block with huge pages.
void* allocate_large_block(std::size_t bytes) {
    const std::size_t size = round_up(bytes);
    void* raw = ::mmap(nullptr, size + huge_page, PROT_READ | PROT_WRITE, MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
    if (raw == MAP_FAILED) throw std::bad_alloc();
    auto start = reinterpret_cast<std::uintptr_t>(raw);
    auto aligned = (start + huge_page - 1) / huge_page * huge_page;
    if (aligned > start) ::munmap(raw, aligned - start);
    const std::size_t tail = (start + size + huge_page) - (aligned + size);
    if (tail > 0) ::munmap(reinterpret_cast<void*>(aligned + size), tail);
    ::madvise(reinterpret_cast<void*>(aligned), size, MADV_HUGEPAGE);  // advice only; fine to fail
    return reinterpret_cast<void*>(aligned);
}

void free_large_block(void* p, std::size_t bytes) { ::munmap(p, round_up(bytes)); }

}  // namespace mirrorcheck::detail
