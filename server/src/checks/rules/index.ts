// Every rule the checks run, in the order their findings are listed.
import { ledCurrentUnlimited } from './led-current-unlimited.js';
import { reverseOvervoltage } from './reverse-overvoltage.js';
import type { Rule } from './rule.js';

export const RULES: readonly Rule[] = [ledCurrentUnlimited, reverseOvervoltage];
