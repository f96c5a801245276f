import type { Command } from '../command';
import { check } from './check';
import { solve } from './solve';
import { shape } from './shape';
import { newCommand } from './new';
import { convert } from './convert';

/** Every subcommand, in the order `hingeplan --help` lists them. */
export const commands: Command[] = [check, solve, shape, newCommand, convert];
