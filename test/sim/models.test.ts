// Every model parameter the solver reads, exercised at once and compared with the reference
// engine: numbers below are ngspice 39's (`LC_ALL=C ngspice -n -b`, numdgt=15, the tight
// options in the netlists). Agreement asked: 1 µV + 1e-6 relative on voltages, 1e-6 relative
// + 1 pA on currents (the target of issue 3).
import { describe, expect, it } from 'vitest';
import { expectKirchhoff, pointOf } from './helpers.js';

function expectNear(actual: number, expected: number, absolute: number): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(absolute + 1e-6 * Math.abs(expected));
}

const HOT_DIODES_AND_FULL_BJT = `hot diodes and a full bjt
.temp 85
V1 in 0 12
R1 in a 1k
D1 a k DT
VAM1 k 0 0
R2 in z 2k
D2 0 z DZT
VB bb 0 0.9
RBIAS bb b 10k
Q1 c b e QFULL
RC in c 2k
RE e 0 100
.model DT D(IS=2e-15 N=1.3 RS=0.7 EG=1.15 XTI=3.5 TNOM=35)
.model DZT D(IS=1e-14 BV=6.2 IBV=5m N=1.1 RS=2)
.model QFULL NPN(IS=2e-16 BF=150 BR=3 NF=1.01 NR=1.02 VAF=80 VAR=20 IKF=30m IKR=5m ISE=1e-14 NE=1.6 ISC=1e-13 NC=2.1 RB=50 RBM=10 IRB=1m RC=3 RE=0.5 XTB=1.2)
.options reltol=1e-9 abstol=1e-18 vntol=1e-12
.end
`;

const MOSFETS = `mosfets with body effect, lambda, reverse mode, pmos, rd rs
VDD vdd 0 9
VG g 0 3.2
M1 d g s 0 NB W=30u L=3u
RD vdd d 1k
RS s 0 220
VG2 g2 0 1.0
M2 d2 g2 vdd vdd PB W=50u L=2u
RL d2 0 1.5k
VX x 0 -2
VGX gx 0 2
M3 x gx 0 0 NB W=10u L=2u
.model NB NMOS(VTO=0.8 KP=110u GAMMA=0.45 PHI=0.7 LAMBDA=0.03 RD=5 RS=3)
.model PB PMOS(VTO=-0.9 KP=40u GAMMA=0.5 PHI=0.65 LAMBDA=0.05)
.temp 50
.options reltol=1e-9 abstol=1e-18 vntol=1e-12
.end
`;

describe('model parameters against ngspice 39', () => {
  it('diodes with EG, XTI, TNOM, N, RS, a zener with N and RS at 85 °C, and a BJT with every DC parameter', () => {
    const point = pointOf(HOT_DIODES_AND_FULL_BJT);
    // ngspice 39
    expectNear(point.nodes.a, 9.819440986295075e-1, 1e-6);
    expectNear(point.nodes.z, 6.187393241369486, 1e-6);
    expectNear(point.nodes.b, 8.20987035604773e-1, 1e-6);
    expectNear(point.nodes.c, 9.342480795289553, 1e-6);
    expectNear(point.nodes.e, 1.336660889456488e-1, 1e-6);
    expectNear(point.branches.VAM1, 1.101805590137056e-2, 1e-12);
    expectNear(point.branches.V1, -1.52531188830410e-2, 1e-12);
    expectNear(point.branches.VB, -7.90129643952270e-6, 1e-12);
    expectKirchhoff(HOT_DIODES_AND_FULL_BJT, point);
  });

  it('NMOS with body effect, LAMBDA, RD and RS, a PMOS, and an NMOS in reverse mode at 50 °C', () => {
    const point = pointOf(MOSFETS);
    // ngspice 39
    expectNear(point.nodes.d, 6.954543947237588, 1e-6);
    expectNear(point.nodes.s, 4.500003298608855e-1, 1e-6);
    expectNear(point.nodes.d2, 8.134552942159559, 1e-6);
    expectNear(point.branches.VX, 2.466282398464267e-1, 1e-12);
    expectNear(point.branches.VDD, -7.46849134753545e-3, 1e-12);
    expectKirchhoff(MOSFETS, point);
  });
});
