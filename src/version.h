/* kphi version, read by the Makefile for kphi.pc. */
#ifndef KPHI_VERSION_H
#define KPHI_VERSION_H
#define KPHI_VERSION "0.1.0"
#endif
