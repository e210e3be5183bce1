// Donor of the precompiled header the libraries share (CMakeLists.txt).
