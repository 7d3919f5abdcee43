import { render, screen } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { HealthMark } from './health-mark';

describe('HealthMark', () => {
  it('pairs every health with its own word and its own shape', () => {
    const shapes = new Set<string>();
    for (const [health, word] of [
      ['steady', 'Steady'],
      ['watch', 'Watch'],
      ['act', 'Act now'],
      ['silent', 'Silent'],
    ] as const) {
      const { container, unmount } = render(<HealthMark health={health} />);
      expect(screen.getByText(word)).toBeInTheDocument();
      const svg = container.querySelector('svg')!;
      shapes.add(svg.innerHTML);
      unmount();
    }
    expect(shapes.size).toBe(4);
  });
});
