/** Headless entry: `metric-triage <command> ...`. */
process.stdout.write('metric-triage: no commands yet\n');
