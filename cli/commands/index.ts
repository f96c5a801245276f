import type { Command } from '../command';
import { check } from './check';
import { solve } from './solve';
import { shape } from './shape';
import { newCommand } from './new';
import { convert } from './convert';
import { branchesCommand } from './branches';
import { sweepCommand } from './sweep';
import { gridCommand } from './grid';
import { followCommand } from './follow';
import { tableCommand } from './table';
import { scheduleCommand } from './schedule';
import { toleranceCommand } from './tolerance';

/** Every subcommand, in the order `hingeplan --help` lists them. */
export const commands: Command[] = [
  check, solve, shape, newCommand, convert,
  branchesCommand, sweepCommand, gridCommand, followCommand, tableCommand, scheduleCommand, toleranceCommand,
];
