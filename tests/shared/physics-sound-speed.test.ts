import { expect } from 'chai';
import { airSoundSpeed, mackenzieSoundSpeed, SPEED_PRESETS } from '../../shared/physics/sound-speed.js';

describe('shared/physics: speed of sound', () => {
  // Mackenzie (1981), JASA 70(3):807–812: published check value 1550.744 m/s at 25 °C, 35 ‰, 1000 m.
  it('Mackenzie check value 1550.744 m/s', () => {
    expect(mackenzieSoundSpeed(25, 35, 1000)).to.be.closeTo(1550.744, 0.0005);
    // Recomputed from the same nine terms (DOMAIN.md §3.8 [C]): 1489.803 m/s at 10 °C, 35 ‰, 0 m.
    expect(mackenzieSoundSpeed(10, 35, 0)).to.be.closeTo(1489.803, 0.0005);
  });

  it('Mackenzie refuses inputs outside its validity range, naming the field', () => {
    expect(() => mackenzieSoundSpeed(35, 35, 100)).to.throw(RangeError, /temperature 35/);
    expect(() => mackenzieSoundSpeed(10, 20, 100)).to.throw(RangeError, /salinity 20/);
    expect(() => mackenzieSoundSpeed(10, 35, 9000)).to.throw(RangeError, /depth 9000/);
  });

  // Ideal dry gas, γ = 1.4 (DOMAIN.md §3.9 [V]): 331.30 m/s at 0 °C, 343.21 at 20 °C, 349.02 at 30 °C.
  it('air: 331.3·√(1 + T/273.15)', () => {
    expect(airSoundSpeed(0)).to.be.closeTo(331.3, 0.005);
    expect(airSoundSpeed(20)).to.be.closeTo(343.21, 0.005);
    expect(airSoundSpeed(30)).to.be.closeTo(349.02, 0.005);
    expect(() => airSoundSpeed(-300)).to.throw(RangeError, /not physical/);
  });

  // CONVENTIONS.md presets; c₀ = 299 792 458 m/s is exact by the SI definition of the metre.
  it('presets', () => {
    expect(SPEED_PRESETS).to.deep.equal({ sea: 1500, fresh: 1481, air: 343, radio: 299792458 });
  });
});
