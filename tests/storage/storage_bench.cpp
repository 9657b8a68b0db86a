#include "server/storage/store.hpp"
int main() { return 0; }
