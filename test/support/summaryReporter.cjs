// Mocha reporter: the usual spec output, plus a JSON stats file for the suite runner's closing line.
const Mocha = require('mocha');
const fs = require('node:fs');

class SummaryReporter extends Mocha.reporters.Spec {
  constructor(runner, options) {
    super(runner, options);
    const file = options.reporterOptions && options.reporterOptions.statsFile;
    runner.once(Mocha.Runner.constants.EVENT_RUN_END, () => {
      if (file) fs.writeFileSync(file, JSON.stringify(runner.stats));
    });
  }
}
module.exports = SummaryReporter;
