build/obj/error.o: src/error.c include/kphi/error.h src/internal.h \
 src/version.h
include/kphi/error.h:
src/internal.h:
src/version.h:
