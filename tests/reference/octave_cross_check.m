% Cross-check of the SciPy reference fixtures with a second, independent tool: GNU Octave's
% control package (Debian: apt-get install octave octave-control). For every delay-free case of
% fixtures/analysis-cases.json it builds the controller and the loop with the package's own
% transfer-function arithmetic and computes
%   * the closed-loop poles, pole(feedback(C*G, 1)) (eigenvalues of a state-space realisation),
%   * margin(C*G): gain margin and phase-crossover frequency, phase margin and gain-crossover
%     frequency (the package reports one crossing each; PM may come out shifted by 360 degrees),
%   * the set-point step response step(T, t) at the fixture's 41 probe times, when the set-point
%     path equals the feedback path (b = 1 and no derivative, or c = 1).
% Loops with dead time are left out: octave-control 3.4 has no dead-time support.
%
% Regenerate (writes fixtures/octave-cross-check.json; a few seconds):
%     octave-cli --no-gui -q tests/reference/octave_cross_check.m
% tests/reference/octave-cross-check.spec.ts compares the engine with it.
1; % a script file (the functions below are local to it)

function v = field_or(s, name, default)
  if isfield(s, name) && ~isempty(s.(name)), v = s.(name); else, v = default; end
end

function v = finite_or_nan(x)
  if isempty(x) || ~isfinite(x), v = NaN; else, v = x; end
end

pkg load control
here = fileparts(mfilename('fullpath'));
fx = jsondecode(fileread(fullfile(here, 'fixtures', 'analysis-cases.json')));
s = tf('s');
out = {};
for k = 1:numel(fx.cases)
  c = fx.cases(k);
  if iscell(fx.cases), c = fx.cases{k}; end
  p = c.plant;
  if p.delay ~= 0, continue; end
  G = tf(p.num(:)', p.den(:)');
  ct = c.controller;
  form = 'ideal'; if isfield(ct, 'form'), form = ct.form; end
  get = @(name, default) field_or(ct, name, default);
  hasI = any(strcmp(ct.type, {'PI', 'PID'}));
  hasD = any(strcmp(ct.type, {'PD', 'PID'}));
  kp = ct.kp;
  n = get('n', []);
  if strcmp(form, 'parallel')
    ki = 0; if hasI, ki = get('ki', 0); end
    kd = 0; if hasD, kd = get('kd', 0); end
    C = tf(kp, 1);
    if hasI, C = C + ki / s; end
    if hasD
      if isempty(n), C = C + kd * s; else, C = C + kd * s / (kd / kp / n * s + 1); end
    end
  else
    td = 0; if hasD, td = get('td', 0); end
    D = tf(0, 1);
    if hasD
      if isempty(n), D = td * s; else, D = td * s / (td / n * s + 1); end
    end
    if strcmp(form, 'ideal')
      C = kp * (1 + D);
      if hasI, C = C + kp / (get('ti', 1) * s); end
    else % series
      I = tf(1, 1); if hasI, I = 1 + 1 / (get('ti', 1) * s); end
      C = kp * I * (1 + D);
    end
  end
  L = C * G;
  T = feedback(L, 1);
  poles = pole(T);
  [gm, pm, wcg, wcp] = margin(L);
  entry = struct('name', c.name);
  entry.poles = struct('re', num2cell(real(poles(:)')), 'im', num2cell(imag(poles(:)')));
  entry.gainMargin = finite_or_nan(gm);
  entry.phaseCrossover = finite_or_nan(wcg);
  entry.phaseMargin = finite_or_nan(pm);
  entry.gainCrossover = finite_or_nan(wcp);
  b = get('b', 1); cw = get('c', 0);
  sameSetpointPath = b == 1 && (~hasD || cw == 1);
  entry.step = [];
  if sameSetpointPath && isfield(c.expected, 'samples') && c.expected.closedLoop.stable
    t = c.expected.samples.t(:);
    y = step(T, t);
    entry.step = struct('t', t', 'y', y(:)');
  end
  out{end + 1} = entry; %#ok<AGROW>
  printf('%-40s poles %d  GM %g  PM %g\n', c.name, numel(poles), gm, pm);
end
v = ver('control');
meta = struct('generator', 'tests/reference/octave_cross_check.m', 'octave', OCTAVE_VERSION, 'control', v.Version);
fid = fopen(fullfile(here, 'fixtures', 'octave-cross-check.json'), 'w');
fprintf(fid, '%s\n', jsonencode(struct('meta', meta, 'cases', {out})));
fclose(fid);
printf('wrote %d cases\n', numel(out));
