// FRESHET_UNDER_ASAN: 1 when the test is built with AddressSanitizer, else 0. ASan keeps freed
// memory in quarantine (256 MB by default) and adds shadow memory, so a process's resident set
// grows with the number of allocations whatever the code does: memory checks mean nothing
// there and skip themselves. GCC defines __SANITIZE_ADDRESS__, clang reports the feature
// through __has_feature.
#pragma once

#if defined(__SANITIZE_ADDRESS__)
#define FRESHET_UNDER_ASAN 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define FRESHET_UNDER_ASAN 1
#endif
#endif
#ifndef FRESHET_UNDER_ASAN
#define FRESHET_UNDER_ASAN 0
#endif
