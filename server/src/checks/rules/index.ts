// Every rule the checks run, in the order their findings are listed.
import { forwardOvercurrent } from './forward-overcurrent.js';
import { ledCurrentUnlimited } from './led-current-unlimited.js';
import { overdissipation } from './overdissipation.js';
import { reverseOvervoltage } from './reverse-overvoltage.js';
import { reversedDiode } from './reversed-diode.js';
import type { Rule } from './rule.js';
import { sharedLedResistor } from './shared-led-resistor.js';
import { zenerForward } from './zener-forward.js';
import { zenerUnderbiased } from './zener-underbiased.js';

export const RULES: readonly Rule[] = [
  reversedDiode,
  ledCurrentUnlimited,
  reverseOvervoltage,
  zenerUnderbiased,
  zenerForward,
  forwardOvercurrent,
  overdissipation,
  sharedLedResistor,
];
