import { render } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { PipelineLink } from '@/features/builds/components/pipeline-link';
import { httpLinkOrNull } from '@/features/builds/utils/http-link';

describe('the pipeline link of a build', () => {
  it.each(['javascript:alert(document.cookie)', ' JavaScript:alert(1)', 'data:text/html,<script>alert(1)</script>', 'vbscript:msgbox(1)', 'ftp://ci.example.test/1', 'not a url'])(
    'renders no anchor for %j',
    (url) => {
      const { container } = render(<PipelineLink url={url} />);
      expect(container.querySelector('a')).toBeNull();
      expect(container.textContent).toBe('');
    },
  );

  it('renders an http(s) URL as a link opening in a new tab', () => {
    const { container } = render(<PipelineLink url="https://ci.example.test/pipelines/41" />);
    const anchor = container.querySelector('a');
    expect(anchor?.getAttribute('href')).toBe('https://ci.example.test/pipelines/41');
    expect(anchor?.getAttribute('rel')).toBe('noreferrer noopener');
    expect(anchor?.textContent).toContain('Pipeline');
  });

  it('keeps only http and https', () => {
    expect(httpLinkOrNull('http://ci.example.test/a')).toBe('http://ci.example.test/a');
    expect(httpLinkOrNull(null)).toBeNull();
    expect(httpLinkOrNull('javascript:alert(1)')).toBeNull();
  });
});
