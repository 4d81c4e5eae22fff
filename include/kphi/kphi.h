/* kphi: chemical equilibrium of high-pressure gas reactions by Gibbs-energy minimisation
 * with equation-of-state fugacity coefficients. This header includes every module. */
#ifndef KPHI_KPHI_H
#define KPHI_KPHI_H

#include "kphi/case.h"
#include "kphi/eos.h"
#include "kphi/equil.h"
#include "kphi/phase.h"
#include "kphi/loop.h"
#include "kphi/sweep.h"
#include "kphi/plot.h"
#include "kphi/error.h"
#include "kphi/report.h"
#include "kphi/rxnset.h"
#include "kphi/species.h"
#include "kphi/thermo.h"
#include "kphi/units.h"

#endif /* KPHI_KPHI_H */
