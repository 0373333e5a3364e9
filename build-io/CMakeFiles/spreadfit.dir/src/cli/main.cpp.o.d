CMakeFiles/spreadfit.dir/src/cli/main.cpp.o: /work/main/src/cli/main.cpp \
 /usr/include/stdc-predef.h
