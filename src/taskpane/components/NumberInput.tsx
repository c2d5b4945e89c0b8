import { Input, type InputProps } from '@fluentui/react-components';
import { useState } from 'react';

/**
 * A number box that lets the reviewer type freely ("3.", "") and reports only valid numbers.
 * The text being typed is local to the box; the pane state holds the number.
 */
export function NumberInput({
  value,
  onValue,
  valid,
  ...rest
}: Omit<InputProps, 'value' | 'onChange' | 'type'> & { value: number; onValue: (n: number) => void; valid: (n: number) => boolean }) {
  const [text, setText] = useState(String(value));
  const [focused, setFocused] = useState(false);
  // When the number changes from outside, show it, unless the box already shows it while being typed in
  // (React's "adjust state when a prop changes" pattern).
  const [shown, setShown] = useState(value);
  if (!Object.is(value, shown)) {
    setShown(value);
    if (!focused || Number(text) !== value) setText(String(value));
  }
  return (
    <Input
      {...rest}
      type="number"
      value={text}
      onFocus={() => setFocused(true)}
      onBlur={() => {
        setFocused(false);
        setText(String(value));
      }}
      onChange={(_, d) => {
        setText(d.value);
        const n = Number(d.value);
        if (d.value.trim() !== '' && Number.isFinite(n) && valid(n)) onValue(n);
      }}
    />
  );
}
