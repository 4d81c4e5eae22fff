build/obj/eos.o: src/eos.c include/kphi/eos.h include/kphi/error.h \
 include/kphi/species.h src/internal.h include/kphi/thermo.h
include/kphi/eos.h:
include/kphi/error.h:
include/kphi/species.h:
src/internal.h:
include/kphi/thermo.h:
