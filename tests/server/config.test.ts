import { expect } from 'chai';
import { ConfigError, loadConfig } from '../../server/config.js';
import { runServerProcess } from './helpers/server-process.js';

describe('server configuration', function () {
  this.timeout(120_000);
  it('uses safe defaults when nothing is set', () => {
    const c = loadConfig({});
    expect(c.port).to.equal(8080);
    expect(c.host).to.equal('127.0.0.1');
    expect(c.demoData).to.equal(true);
    expect(c.trustProxy).to.equal(false);
    expect(c.cookieSecure).to.equal('auto');
    expect(c.sessionMaxAgeMs).to.equal(12 * 3_600_000);
  });

  it('names every bad variable, its value and what to set', () => {
    try {
      loadConfig({ PORT: 'eighty', DEMO_DATA: 'maybe', DATABASE_URL: 'mysql://x', SESSION_SECRET: 'short' });
      expect.fail('loadConfig accepted bad settings');
    } catch (err) {
      expect(err).to.be.instanceOf(ConfigError);
      const msg = (err as ConfigError).message;
      expect(msg).to.match(/PORT="eighty": must be a whole number/);
      expect(msg).to.match(/DEMO_DATA="maybe": must be "on" or "off"/);
      expect(msg).to.match(/DATABASE_URL="mysql:\/\/x": must be a postgres/);
      expect(msg).to.match(/SESSION_SECRET="short": must be at least 32 characters/);
      expect((err as ConfigError).problems).to.have.length(4);
    }
  });

  it('reads proxy and cookie settings', () => {
    expect(loadConfig({ TRUST_PROXY: '1' }).trustProxy).to.equal(1);
    expect(loadConfig({ TRUST_PROXY: 'on' }).trustProxy).to.equal(true);
    expect(loadConfig({ TRUST_PROXY: '10.0.0.0/8, 127.0.0.1' }).trustProxy).to.equal('10.0.0.0/8, 127.0.0.1');
    expect(loadConfig({ COOKIE_SECURE: 'on' }).cookieSecure).to.equal(true);
    expect(() => loadConfig({ TRUST_PROXY: 'yes please' })).to.throw(ConfigError, /TRUST_PROXY="yes please"/);
    expect(() => loadConfig({ COOKIE_SECURE: 'always' })).to.throw(ConfigError, /COOKIE_SECURE="always"/);
  });

  it('treats blank variables as unset', () => {
    expect(loadConfig({ PORT: '', DATABASE_URL: '' }).port).to.equal(8080);
  });

  it('the server process refuses bad settings with a readable message and exit code 1', async () => {
    const { code, stdout, stderr } = await runServerProcess({ PORT: '99999', LOG_LEVEL: 'loud' });
    expect(code).to.equal(1);
    expect(stdout).to.equal('');
    expect(stderr).to.contain('Nullsmith cannot start; fix these settings:');
    expect(stderr).to.contain('PORT="99999": must be at most 65535');
    expect(stderr).to.contain('LOG_LEVEL="loud"');
    expect(stderr).not.to.match(/\n\s+at /); // no stack trace for a settings mistake
  });
});
