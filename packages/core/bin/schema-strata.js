#!/usr/bin/env node
import { runAsProcess } from '../dist/cli/process.js';

runAsProcess();
