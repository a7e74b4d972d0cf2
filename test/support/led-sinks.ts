// LED current sinks and strings shared by the sink tests of the checks and of the fixes: scenarios of
// our own; their numbers are checked against ngspice 39 where they are used.

// An aquarium hood: a blue LED in the collector of an NPN sink, its base held at two diode
// drops, its emitter resistor fitted as 18 Ω: about (1.2 V − 0.65 V) / 18 Ω = 30 mA.
export const NPN_SINK = `Aquarium hood: blue LED in the collector of an NPN sink
V9 v9 0 DC 9
RB v9 b 4.7k
DB1 b m SIG
DB2 m 0 SIG
Q1 k b e NPNSMALL
RS e 0 18
DBLUE v9 k LEDBLUE
.model SIG D(IS=2n N=1.8 RS=0.5)
.model LEDBLUE D(IS=1e-24 N=2.2 RS=5)
.model NPNSMALL NPN(IS=2e-14 BF=200 VAF=60)
.end
`;

// A warning beacon: an amber LED in the drain of an N-MOSFET sink held by an amplifier.
export const MOSFET_BEACON = `Warning beacon: amber LED in the drain of an N-MOSFET sink regulated by an amplifier
V12 v12 0 DC 12
VREF ref 0 DC 0.5
*pnlint: supply VREF min=0.5 max=0.5
EAMP g 0 ref s 100k
M1 k g s s NPOWER L=2u W=400u
RSNS s 0 10
DAMB v12 k LEDAMB
.model NPOWER NMOS(VTO=1.5 KP=50u LAMBDA=0.01)
.model LEDAMB D(IS=1e-21 N=2 RS=3)
.end
`;

/** A shelf strip: three white LEDs in series on 12 V through one 47 Ω resistor, with the LED ratings given. */
export function shelfStrip(ratings: string): string {
  return `Shelf strip: three white LEDs in series on 12 V through one 47 ohm resistor
V12 v12 0 DC 12
RLIM v12 a 47
D1 a s1 LEDW
D2 s1 s2 LEDW
D3 s2 0 LEDW
*pnlint: rating LEDW kind=led ${ratings}
.model LEDW D(IS=1e-26 N=2.3 RS=6)
.end
`;
}
