// toml++'s implementation, compiled into the fuzz build with the sanitizers (see
// CMakeLists.txt); its definitions take the place of the Debian shared library's.
#define TOML_IMPLEMENTATION
#include <toml++/toml.h>
