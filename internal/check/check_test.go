package check_test

import (
	"errors"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"scalematch/internal/check"
)

func TestFieldsMergeAndErr(t *testing.T) {
	t.Parallel()
	var fe check.Fields
	require.NoError(t, fe.Err(), "no problems: no error")

	inner := check.Invalid("model", []check.FieldError{{Field: "scale", Message: "must be positive"}})
	assert.True(t, fe.Merge("model", inner))
	assert.False(t, fe.Merge("test", errors.New("the store is down")), "only invalid-input errors merge")
	assert.False(t, fe.Merge("test", &check.Error{Code: check.CodeUnprocessable, Message: "no feasible setting"}))
	assert.True(t, fe.Merge("flight", &check.Error{Code: check.CodeInvalid, Message: "give altitude or pressure_altitude"}))
	fe.Add("alpha.step", "must be above zero, got %g", -1.0)

	err := fe.Err()
	require.Error(t, err)
	assert.Equal(t, check.CodeInvalid, check.ErrorCode(err))
	assert.Equal(t, "3 fields are invalid: model.scale: must be positive; flight: give altitude or pressure_altitude; alpha.step: must be above zero, got -1", err.Error())
}

func TestFieldsErrCapsTheList(t *testing.T) {
	t.Parallel()
	var fe check.Fields
	for i := range check.MaxListed + 7 {
		fe.Add(fmt.Sprintf("points[%d]", i), "bad")
	}
	var de *check.Error
	require.ErrorAs(t, fe.Err(), &de)
	assert.Len(t, de.Fields, check.MaxListed)
	assert.Equal(t, fmt.Sprintf("%d fields are invalid (the first %d are listed)", check.MaxListed+7, check.MaxListed), de.Message)
}

func TestErrorCodeAndLimits(t *testing.T) {
	t.Parallel()
	assert.Equal(t, check.Code(""), check.ErrorCode(errors.New("plain")))
	wrapped := fmt.Errorf("plan: %w", &check.Error{Code: check.CodeUnprocessable, Message: "no setting fits", Limits: []string{"max_dynamic_pressure", "blockage"}})
	assert.Equal(t, check.CodeUnprocessable, check.ErrorCode(wrapped))
	assert.Equal(t, "plan: no setting fits (limits: max_dynamic_pressure, blockage)", wrapped.Error())
	assert.Nil(t, check.Invalid("nothing", nil))
	assert.Equal(t, "1 field is invalid", check.InvalidCount(1))
	assert.Equal(t, "facility.balances[0].id", check.JoinPath("facility", "balances[0].id"))
	assert.Equal(t, "x", check.JoinPath("", "x"))
	assert.Equal(t, "p", check.JoinPath("p", ""))
}
