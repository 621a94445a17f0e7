// Model cards for the reference comparisons: generic values chosen for these tests (a fictional
// 0.18 um-class BSIM3 process and a 45 nm-class BSIM4 process). They describe no real foundry.

export const BSIM3_NMOS = `.model n18 nmos level=49 version=3.3 tox=4.1e-9 vth0=0.42 k1=0.55 k2=0.01 k3=1e-3 dvt0=1.5 dvt1=0.6 dvt2=-0.05
+ nch=2.5e17 u0=0.035 ua=-1.2e-9 ub=2.2e-18 uc=4e-11 vsat=9e4 a0=1.6 ags=0.4 keta=-0.01 rdsw=120 wr=1
+ nfactor=1.3 cdsc=2.4e-4 cdscd=0 cdscb=0 cit=0 voff=-0.09 eta0=0.004 etab=0 dsub=0.5 pclm=0.8 pdiblc1=0.25 pdiblc2=0.002
+ kt1=-0.21 kt2=0.02 ute=-1.5 ua1=1e-9 ub1=-2e-18 uc1=-5e-11 at=3.3e4 tnom=27 xj=1.5e-7
+ cgso=3e-10 cgdo=3e-10 cgbo=1e-12 cj=9.6e-4 mj=0.38 pb=0.8 cjsw=2.4e-10 mjsw=0.3 pbsw=0.8 js=1e-6 jsw=1e-11 xti=3 nj=1`;

export const BSIM3_PMOS = `.model p18 pmos level=49 version=3.3 tox=4.1e-9 vth0=-0.45 k1=0.56 k2=0.02 k3=1e-3 dvt0=1.0 dvt1=0.5 dvt2=-0.05
+ nch=3e17 u0=0.011 ua=1.2e-9 ub=1e-21 uc=-1e-10 vsat=1.1e5 a0=1.2 ags=0.3 keta=0.02 rdsw=300 wr=1
+ nfactor=1.4 cdsc=2.4e-4 voff=-0.1 eta0=0.005 etab=0 dsub=0.6 pclm=1.5 kt1=-0.22 kt2=0.02 ute=-1.2 tnom=27 xj=1.5e-7
+ cgso=3.2e-10 cgdo=3.2e-10 cgbo=1e-12 cj=1.1e-3 mj=0.41 pb=0.85 cjsw=2.7e-10 mjsw=0.32 pbsw=0.85 js=1e-6 jsw=1e-11 xti=3 nj=1`;
