build/obj/thermo.o: src/thermo.c include/kphi/thermo.h \
 include/kphi/species.h include/kphi/error.h
include/kphi/thermo.h:
include/kphi/species.h:
include/kphi/error.h:
