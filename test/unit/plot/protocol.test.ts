/** Messages between host and webview: everything received is validated; anything else is dropped. */
import { strict as assert } from 'node:assert';
import { parseHostMessage, parseWebviewMessage } from '../../../src/core/plot/protocol';
import { buildPlotData } from '../../../src/core/plot/spec';

describe('plot protocol', () => {
  it('accepts the webview messages the panel understands', () => {
    assert.deepEqual(parseWebviewMessage({ type: 'ready' }), { type: 'ready' });
    assert.deepEqual(parseWebviewMessage({ type: 'rendered', layers: 2, marks: 7, formulas: 1 }),
      { type: 'rendered', layers: 2, marks: 7, formulas: 1 });
    assert.deepEqual(parseWebviewMessage({ type: 'domain', from: -3, to: 3 }), { type: 'domain', from: -3, to: 3 });
    assert.deepEqual(parseWebviewMessage({ type: 'param', name: 'α', value: 0.5 }), { type: 'param', name: 'α', value: 0.5 });
    assert.deepEqual(parseWebviewMessage({ type: 'floatType', value: 'bfloat16' }), { type: 'floatType', value: 'bfloat16' });
    assert.ok(parseWebviewMessage({ type: 'export', format: 'svg', data: '<svg xmlns="http://www.w3.org/2000/svg"></svg>' }));
    assert.ok(parseWebviewMessage({ type: 'export', format: 'png', data: 'data:image/png;base64,iVBORw0KGgo=' }));
  });

  it('rejects wrong shapes, extra keys, non-finite numbers and foreign payloads', () => {
    const bad: unknown[] = [
      null, 'ready', [], { type: 'nope' }, { type: 'ready', extra: 1 },
      { type: 'rendered', layers: -1, marks: 1, formulas: 1 }, { type: 'rendered', layers: 1.5, marks: 1, formulas: 1 },
      { type: 'domain', from: 3, to: -3 }, { type: 'domain', from: NaN, to: 1 }, { type: 'domain', from: -1e9, to: 1 },
      { type: 'param', name: 'constructor()', value: 1 }, { type: 'param', name: 'a', value: Infinity },
      { type: 'floatType', value: 'float64' },
      { type: 'export', format: 'svg', data: '<script>alert(1)</script>' },
      { type: 'export', format: 'png', data: 'data:text/html;base64,AAAA' },
      { type: 'export', format: 'pdf', data: '<svg></svg>' },
    ];
    for (const m of bad) assert.equal(parseWebviewMessage(m), undefined, JSON.stringify(m));
  });

  it('the webview accepts the host\'s plot message and rejects malformed data', () => {
    const data = buildPlotData([{ label: 'tanh', f: Math.tanh, df: (x) => 1 - Math.tanh(x) ** 2 }],
      { domain: [-2, 2], samples: 20, floatType: 'float16' });
    const state = { domain: [-2, 2], floatType: 'float16', params: [], formulas: ['tanh'] };
    assert.ok(parseHostMessage({ type: 'plot', data, state }));
    assert.equal(parseHostMessage({ type: 'plot', data: { ...data, series: [{ x: 'a' }] }, state }), undefined);
    assert.equal(parseHostMessage({ type: 'plot', data, state: { ...state, floatType: 'int8' } }), undefined);
    assert.equal(parseHostMessage({ type: 'plot', data: { ...data, view: { xMin: 0 } }, state }), undefined);
  });
});
