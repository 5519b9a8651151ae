import { mackenzieSoundSpeed } from '../../shared/physics/sound-speed.js';

/** Sea-water speed of sound for array media: Mackenzie (1981), the same code the client runs. */
export const seaWaterSpeed = (temperatureC: number, salinityPsu: number, depthM: number): number =>
  mackenzieSoundSpeed(temperatureC, salinityPsu, depthM);
