/** A model worker thread: loads the network once, then runs the grid's models with runModel. */
import { UserError } from '../config/errors.ts';
import { outputSpeciesNames } from '../chem/mantle.ts';
import { loadNetwork } from '../chem/network.ts';
import { modelInput, runModel } from '../model/run.ts';
import { serveModelTasks } from './worker-protocol.ts';

serveModelTasks((init) => {
  const network = loadNetwork(init.networkFile);
  if (network.contentHash !== init.networkHash) {
    throw new UserError('the network file changed while the grid was starting; rerun the grid.', { file: init.networkFile });
  }
  return {
    species: outputSpeciesNames(network, init.options.grain),
    run: (conditions, rateDraw, track) => runModel(modelInput({ network, options: rateDraw || track ? { ...init.options, ...(rateDraw ? { rateDraw } : {}), ...(track ? { track } : {}) } : init.options }, conditions)),
  };
});
