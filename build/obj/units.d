build/obj/units.o: src/units.c include/kphi/units.h include/kphi/error.h \
 src/internal.h
include/kphi/units.h:
include/kphi/error.h:
src/internal.h:
