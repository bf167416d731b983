#!/usr/bin/env node
import { runCli } from '../dist/cli/program.js';

runCli(process.argv);
