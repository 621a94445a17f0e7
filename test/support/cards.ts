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

export const BSIM4_NMOS = `.model n45 nmos level=54 version=4.7 toxe=1.8e-9 toxp=1.5e-9 toxm=1.8e-9 epsrox=3.9 vth0=0.40 k1=0.40 k2=0.01 k3=0
+ dvt0=1.0 dvt1=2.0 dvt2=0 lpe0=0 lpeb=0 dvtp0=1e-10 dvtp1=0.1 ndep=3.4e18 nsd=2e20 xj=1.4e-8 u0=0.045 ua=6e-10 ub=1.2e-18 uc=0
+ vsat=1.5e5 a0=1.0 ags=0 keta=0.04 rdsw=150 rdswmin=100 prwg=0 prwb=0 wr=1 nfactor=2.1 cdsc=0 cdscd=0 cdscb=0 cit=0
+ voff=-0.13 voffl=0 minv=0.05 eta0=0.0055 etab=0 dsub=0.1 pclm=0.02 pdiblc1=0.001 pdiblc2=0.001 delta=0.01 mobmod=0
+ kt1=-0.11 kt2=0.022 ute=-1.5 ua1=4.3e-9 ub1=-7.6e-18 uc1=0 at=3.3e4 tnom=27 rdsmod=0 igcmod=0 igbmod=0
+ cgso=1.1e-10 cgdo=1.1e-10 cgbo=2.56e-11 cjs=6e-4 mjs=0.3 pbs=0.8 cjsws=5e-10 mjsws=0.3 pbsws=0.8 jss=1e-6 jsws=1e-12 xtis=3 njs=1`;

export const BSIM4_PMOS = `.model p45 pmos level=54 version=4.7 toxe=1.85e-9 toxp=1.5e-9 toxm=1.85e-9 epsrox=3.9 vth0=-0.42 k1=0.40 k2=-0.01 k3=0
+ dvt0=1.0 dvt1=2.0 dvt2=-0.032 lpe0=0 lpeb=0 dvtp0=1e-11 dvtp1=0.05 ndep=2.4e18 nsd=2e20 xj=1.4e-8 u0=0.0075 ua=2e-9 ub=5e-19 uc=0
+ vsat=7e4 a0=1.0 ags=1e-20 keta=-0.047 rdsw=155 rdswmin=100 prwg=0 prwb=0 wr=1 nfactor=2.1 cdsc=0 cdscd=0 cdscb=0 cit=0
+ voff=-0.126 voffl=0 minv=0.05 eta0=0.0055 etab=0 dsub=0.2 pclm=0.12 pdiblc1=0.001 pdiblc2=0.001 delta=0.01 mobmod=0
+ kt1=-0.11 kt2=0.022 ute=-1.5 ua1=4.3e-9 ub1=-7.6e-18 uc1=0 at=3.3e4 tnom=27 rdsmod=0 igcmod=0 igbmod=0
+ cgso=1.1e-10 cgdo=1.1e-10 cgbo=2.56e-11 cjs=6e-4 mjs=0.3 pbs=0.8 cjsws=5e-10 mjsws=0.3 pbsws=0.8 jss=1e-6 jsws=1e-12 xtis=3 njs=1`;
